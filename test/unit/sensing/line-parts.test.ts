import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { dayNumber } from '../../../src/calendar/day-number.ts';
import { applyBaselineVersion } from '../../../src/sensing/apply-baseline.ts';
import { applyOrderLine } from '../../../src/sensing/apply-order-line.ts';
import { applyShipment } from '../../../src/sensing/apply-shipment.ts';
import { buildParts, PART_FIRST_FILL, PART_LARGE, seriesParts, type SeriesParts } from '../../../src/sensing/line-parts.ts';
import { createLocationState } from '../../../src/sensing/location-state.ts';
import { pruneLocationState } from '../../../src/sensing/prune.ts';
import { DEFAULT_SENSING_SETTINGS } from '../../../src/sensing/settings.ts';
import { baseline, line, MASTER, shipment } from './helpers/records.ts';

const S = DEFAULT_SENSING_SETTINGS;
const ITEM = 'SPARK-LEMON-330';
const DAY = 86_400_000;
const T0 = Date.parse('2026-03-02T08:00:00Z');
const MONDAYS = Array.from({ length: 12 }, (_, w) => new Date(Date.parse('2026-03-02T00:00:00Z') + 7 * w * DAY).toISOString().slice(0, 10));

function plain(p: SeriesParts) {
  const cols = ['knownMs', 'knownDay', 'requestedDay', 'orderedDay', 'firstKnownDay', 'customer', 'flags', 'quantity'] as const;
  return {
    n: p.n,
    firstActivityDay: p.firstActivityDay,
    ...Object.fromEntries(cols.map((c) => [c, Array.from(p[c])])),
    shipments: Object.fromEntries((['knownMs', 'knownDay', 'shipDay', 'quantity', 'lagDays'] as const).map((c) => [c, Array.from(p.shipments[c])])),
  };
}

/** One input event: an order-line revision or a baseline version, with its knowledge instant in hours from T0. */
type Event =
  | { kind: 'line'; order: number; revision: number; hour: number; quantity: number; customer: number; requestedWeek: number; cancel: boolean }
  | { kind: 'baseline'; hour: number; level: number }
  | { kind: 'shipment'; id: number; order: number; hour: number; quantity: number };

const lineEvent = fc.record({
  kind: fc.constant('line' as const),
  order: fc.integer({ min: 0, max: 6 }),
  revision: fc.integer({ min: 1, max: 3 }),
  hour: fc.integer({ min: 0, max: 24 * 40 }),
  // Mostly ordinary sizes, now and then a line far above the usual (the large-line rule must fire sometimes).
  quantity: fc.oneof({ weight: 6, arbitrary: fc.integer({ min: 1, max: 12 }) }, { weight: 1, arbitrary: fc.integer({ min: 200, max: 900 }) }),
  customer: fc.integer({ min: 0, max: 2 }),
  requestedWeek: fc.integer({ min: 0, max: 7 }),
  cancel: fc.boolean(),
});
// Shipments of the orders' lines (so their lag reads the line's current requested date), some ids repeated.
const shipmentEvent = fc.record({
  kind: fc.constant('shipment' as const),
  id: fc.integer({ min: 0, max: 30 }),
  order: fc.integer({ min: 0, max: 6 }),
  hour: fc.integer({ min: 0, max: 24 * 40 }),
  quantity: fc.integer({ min: 1, max: 12 }),
});
const baselineEvent = fc.record({ kind: fc.constant('baseline' as const), hour: fc.integer({ min: 0, max: 24 * 40 }), level: fc.integer({ min: 50, max: 300 }) });

function apply(state: ReturnType<typeof createLocationState>, e: Event, k: number): void {
  const at = new Date(T0 + e.hour * 3_600_000).toISOString();
  if (e.kind === 'shipment') {
    applyShipment(state, shipment({ shipmentId: `SH-${e.id}`, orderId: `O-${e.order}`, lineId: '1', quantity: e.quantity, shippedAt: at }));
    return;
  }
  if (e.kind === 'baseline') {
    applyBaselineVersion(state, baseline({ version: k + 1, publishedAt: at, weeks: MONDAYS.map((weekStart) => ({ weekStart, quantity: e.level })) }));
    return;
  }
  const orderedAt = new Date(T0 + Math.max(0, e.hour - 24 * (e.revision - 1)) * 3_600_000).toISOString();
  applyOrderLine(
    state,
    line({
      orderId: `O-${e.order}`,
      lineId: '1',
      revision: e.revision,
      op: e.cancel && e.revision > 1 ? 'cancel' : 'upsert',
      quantity: e.quantity,
      orderedAt,
      ...(e.revision > 1 ? { changedAt: at } : {}),
      requestedDate: MONDAYS[e.requestedWeek + 2]!,
      customer: `C-${e.customer}`,
    }),
  );
}

describe('line parts kept by appending', () => {
  it('equal a walk from scratch after every record, shipments included, whatever the arrival order, across a prune', () => {
    fc.assert(
      fc.property(
        fc.array(fc.oneof({ weight: 8, arbitrary: lineEvent }, { weight: 1, arbitrary: baselineEvent }, { weight: 3, arbitrary: shipmentEvent }), { minLength: 1, maxLength: 60 }),
        // Share of the events delivered in knowledge order (the rest arrive late, out of order).
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.integer({ min: 0, max: 59 }),
        (events, orderedShare, pruneAt) => {
          const cut = Math.floor(orderedShare * events.length);
          const arrival = [...events.slice(0, cut)].sort((a, b) => a.hour - b.hour).concat(events.slice(cut));
          const state = createLocationState(MASTER);
          arrival.forEach((e, k) => {
            apply(state, e, k);
            if (k === pruneAt) pruneLocationState(state, dayNumber('2026-04-20'));
            const series = state.series.get(ITEM);
            if (!series) return;
            expect(plain(seriesParts(series, S, 1))).toEqual(plain(buildParts(series, S, 1)));
          });
        },
      ),
      { numRuns: 150, seed: 20261202 },
    );
  });

  it('flag large and first-fill lines the same way when the day’s lines are appended', () => {
    const state = createLocationState(MASTER);
    applyBaselineVersion(state, baseline({ version: 1, publishedAt: '2026-03-02T06:00:00+01:00', weeks: MONDAYS.map((weekStart) => ({ weekStart, quantity: 100 })) }));
    // Ten ordinary lines of 10 from one customer, one per day, then a line of 400 (4× the week's baseline share).
    for (let d = 0; d < 10; d++) {
      applyOrderLine(state, line({ orderId: `O-${d}`, quantity: 10, orderedAt: new Date(T0 + d * DAY).toISOString(), requestedDate: MONDAYS[3]! }));
      seriesParts(state.series.get(ITEM)!, S, 1);
    }
    applyOrderLine(state, line({ orderId: 'O-big', quantity: 400, orderedAt: new Date(T0 + 10 * DAY).toISOString(), requestedDate: MONDAYS[3]! }));
    const parts = seriesParts(state.series.get(ITEM)!, S, 1);
    expect(parts.n).toBe(11);
    // First line of the customer is its first fill; the 400 is large (above 0.5 × 100 and 5 × the usual 10 —
    // the settings' large-line factors, checked here by hand).
    expect(parts.flags[0]! & PART_FIRST_FILL).toBe(PART_FIRST_FILL);
    expect(parts.flags[10]! & PART_LARGE).toBe(PART_LARGE);
    expect(Array.from(parts.flags.subarray(1, 10)).every((f) => f === 0)).toBe(true);
    expect(plain(parts)).toEqual(plain(buildParts(state.series.get(ITEM)!, S, 1)));
  });
});
