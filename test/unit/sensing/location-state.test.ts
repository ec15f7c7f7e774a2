import { describe, expect, it } from 'vitest';
import { dayNumber } from '../../../src/calendar/day-number.ts';
import { applyBaselineVersion } from '../../../src/sensing/apply-baseline.ts';
import { applyDayClosed, applyLocationMaster } from '../../../src/sensing/apply-master.ts';
import { applyOrderLine } from '../../../src/sensing/apply-order-line.ts';
import { applyShipment } from '../../../src/sensing/apply-shipment.ts';
import { versionKnownAt, weekValue } from '../../../src/sensing/baseline-lookup.ts';
import { seriesParts } from '../../../src/sensing/line-parts.ts';
import { createLocationState, type LocationState } from '../../../src/sensing/location-state.ts';
import { pruneLocationState } from '../../../src/sensing/prune.ts';
import { DEFAULT_SENSING_SETTINGS } from '../../../src/sensing/settings.ts';
import { restoreLocationState, snapshotLocationState } from '../../../src/sensing/snapshot.ts';
import { baseline, line, MASTER, shipment } from './helpers/records.ts';

const S = DEFAULT_SENSING_SETTINGS;
const ITEM = 'SPARK-LEMON-330';

/** Order book by requested day as known at the end of local day `asOf` (sum of parts known by then). */
function bookAsOf(state: LocationState, asOf: string): Map<string, number> {
  const parts = seriesParts(state.series.get(ITEM)!, S, 1);
  const cut = dayNumber(asOf);
  const out = new Map<string, number>();
  for (let i = 0; i < parts.n; i++) {
    if (parts.knownDay[i]! > cut) continue;
    const d = new Date(parts.requestedDay[i]! * 86_400_000).toISOString().slice(0, 10);
    out.set(d, (out.get(d) ?? 0) + parts.quantity[i]!);
  }
  for (const [k, v] of out) if (Math.abs(v) < 1e-12) out.delete(k);
  return out;
}

describe('order lines in the location state', () => {
  it('lets the highest revision decide a line whatever the arrival order', () => {
    const r1 = line({ revision: 1, quantity: 10 });
    const r2 = line({ revision: 2, quantity: 14, changedAt: '2026-03-03T10:00:00+01:00' });
    const r3 = line({ revision: 3, quantity: 6, changedAt: '2026-03-04T10:00:00+01:00' });
    const a = createLocationState(MASTER);
    expect([r1, r2, r3].map((r) => applyOrderLine(a, r).status)).toEqual(['applied', 'applied', 'applied']);
    const b = createLocationState(MASTER);
    expect([r3, r1, r2].map((r) => applyOrderLine(b, r).status)).toEqual(['applied', 'superseded', 'superseded']);
    expect(bookAsOf(b, '2026-03-08')).toEqual(new Map([['2026-03-10', 6]]));
    expect(JSON.stringify(snapshotLocationState(a))).toBe(JSON.stringify(snapshotLocationState(b)));
  });

  it('keeps the order book as it was known on each past day (knowledge time of each revision)', () => {
    const s = createLocationState(MASTER);
    applyOrderLine(s, line({ revision: 1, quantity: 10 })); // ordered Mon 2 March
    applyOrderLine(s, line({ revision: 2, quantity: 14, changedAt: '2026-03-04T10:00:00+01:00' }));
    applyOrderLine(s, line({ revision: 3, op: 'cancel', quantity: undefined, changedAt: '2026-03-06T10:00:00+01:00' }));
    expect(bookAsOf(s, '2026-03-02')).toEqual(new Map([['2026-03-10', 10]]));
    expect(bookAsOf(s, '2026-03-03')).toEqual(new Map([['2026-03-10', 10]]));
    expect(bookAsOf(s, '2026-03-05')).toEqual(new Map([['2026-03-10', 14]]));
    expect(bookAsOf(s, '2026-03-06')).toEqual(new Map()); // cancelled: zero from its changedAt on
  });

  it('moves the quantity when a revision moves the requested date', () => {
    const s = createLocationState(MASTER);
    applyOrderLine(s, line({ revision: 1, quantity: 8, requestedDate: '2026-03-10' }));
    applyOrderLine(s, line({ revision: 2, quantity: 8, requestedDate: '2026-03-17', changedAt: '2026-03-05T08:00:00+01:00' }));
    expect(bookAsOf(s, '2026-03-04')).toEqual(new Map([['2026-03-10', 8]]));
    expect(bookAsOf(s, '2026-03-05')).toEqual(new Map([['2026-03-17', 8]]));
  });

  it('changes nothing for a duplicate event id or a repeated revision', () => {
    const s = createLocationState(MASTER);
    const r = line({ quantity: 5 });
    expect(applyOrderLine(s, r).status).toBe('applied');
    expect(applyOrderLine(s, r).status).toBe('duplicate');
    expect(applyOrderLine(s, { ...r, eventId: 'another-id' }).status).toBe('duplicate');
    expect(applyOrderLine(s, { ...r, orderId: 'O-2', lineId: '9' }).status).toBe('duplicate'); // same event id
    expect(bookAsOf(s, '2026-03-09')).toEqual(new Map([['2026-03-10', 5]]));
  });

  it('counts a late record from when it arrived, never from its own earlier time', () => {
    const s = createLocationState(MASTER);
    applyOrderLine(s, line({ quantity: 7 }), { knownAt: '2026-03-05T12:00:00+01:00' });
    expect(bookAsOf(s, '2026-03-04')).toEqual(new Map());
    expect(bookAsOf(s, '2026-03-05')).toEqual(new Map([['2026-03-10', 7]]));
  });

  it('refuses a revision older than the lookback plus the horizon behind the event time, and a record of another location', () => {
    const s = createLocationState(MASTER);
    applyOrderLine(s, line({ orderId: 'NEW', orderedAt: '2026-09-01T09:00:00+02:00', requestedDate: '2026-09-08' }));
    const late = applyOrderLine(s, line({ orderId: 'OLD', orderedAt: '2026-03-02T09:00:00+01:00' }));
    expect(late).toMatchObject({ status: 'rejected', code: 'NEARCAST_INPUT_TOO_LATE', path: 'orderedAt' });
    const other = applyOrderLine(s, line({ location: 'DC-SOUTH' as never }));
    expect(other).toMatchObject({ status: 'rejected', code: 'NEARCAST_INPUT_WRONG_LOCATION', path: 'location' });
  });
});

describe('shipments and baselines in the location state', () => {
  it('takes each shipment once by its shipment id', () => {
    const s = createLocationState(MASTER);
    expect(applyShipment(s, shipment({ shipmentId: 'SH-9', quantity: 4 })).status).toBe('applied');
    expect(applyShipment(s, shipment({ shipmentId: 'SH-9', quantity: 40 })).status).toBe('duplicate');
    expect(s.series.get(ITEM)!.shipments.length).toBe(1);
  });

  it('rejects a baseline week that does not start on the location week start, naming the week', () => {
    const s = createLocationState(MASTER);
    const out = applyBaselineVersion(s, baseline({ weeks: [{ weekStart: '2026-03-02', quantity: 1 }, { weekStart: '2026-03-11', quantity: 1 }] }));
    expect(out).toMatchObject({ status: 'rejected', code: 'NEARCAST_INPUT_WEEK_MISALIGNED', path: 'weeks.1.weekStart' });
    expect((out as { message: string }).message).toContain('2026-03-11 is a wednesday');
    // A location whose weeks start on Sunday takes Sunday weeks.
    const sunday = createLocationState({ ...MASTER, weekStart: 'sunday' });
    expect(applyBaselineVersion(sunday, baseline({ weeks: [{ weekStart: '2026-03-08', quantity: 1 }] })).status).toBe('applied');
  });

  it('recovers the baseline of a week as it was known on an earlier day', () => {
    const s = createLocationState(MASTER);
    applyBaselineVersion(s, baseline({ version: 1, publishedAt: '2026-03-02T06:00:00+01:00', weeks: [{ weekStart: '2026-03-16', quantity: 100 }] }));
    applyBaselineVersion(s, baseline({ version: 2, publishedAt: '2026-03-09T06:00:00+01:00', weeks: [{ weekStart: '2026-03-16', quantity: 130 }] }));
    const series = s.series.get(ITEM)!;
    const week = dayNumber('2026-03-16');
    expect(weekValue(versionKnownAt(series, dayNumber('2026-03-06')), week)).toBe(100); // lead 2 view
    expect(weekValue(versionKnownAt(series, dayNumber('2026-03-11')), week)).toBe(130); // lead 1 view
    expect(applyBaselineVersion(s, baseline({ version: 1 })).status).toBe('duplicate');
  });
});

describe('snapshot and pruning', () => {
  it('round-trips through JSON to the same snapshot', () => {
    const s = createLocationState(MASTER);
    applyOrderLine(s, line({ quantity: 3, customer: 'CAFE-ZED' }));
    applyOrderLine(s, line({ orderId: 'O-2', quantity: 5, customer: 'BAR-ALPHA' }));
    applyShipment(s, shipment({}));
    applyBaselineVersion(s, baseline({}));
    applyDayClosed(s, { eventId: 'dc-1', location: 'DC-NORTH', date: '2026-03-02' } as never);
    const snap = JSON.parse(JSON.stringify(snapshotLocationState(s)));
    const back = restoreLocationState(snap);
    expect(snapshotLocationState(back)).toEqual(snap);
    expect(snap.customers).toEqual(['BAR-ALPHA', 'CAFE-ZED']);
  });

  it('refuses a damaged snapshot with NEARCAST_STATE_CORRUPT', () => {
    const s = createLocationState(MASTER);
    applyOrderLine(s, line({}));
    const snap = JSON.parse(JSON.stringify(snapshotLocationState(s)));
    snap.series[0].lines.quantity = [];
    expect(() => restoreLocationState(snap)).toThrow(/order lines are incomplete/);
    expect(() => restoreLocationState({ schema: 'something-else' })).toThrow(/NEARCAST|snapshot/);
  });

  it('drops lines, shipments and superseded baselines older than the retention window, keeping the rest', () => {
    const s = createLocationState(MASTER);
    // Applied in knowledge order, as a replay would (a record half a year behind the event time is too late).
    expect(applyBaselineVersion(s, baseline({ version: 1, publishedAt: '2026-01-05T06:00:00+01:00', weeks: [{ weekStart: '2026-01-05', quantity: 1 }] })).status).toBe('applied');
    expect(applyOrderLine(s, line({ orderId: 'OLD', orderedAt: '2026-01-05T09:00:00+01:00', requestedDate: '2026-01-07' })).status).toBe('applied');
    expect(applyBaselineVersion(s, baseline({ version: 2, publishedAt: '2026-02-02T06:00:00+01:00', weeks: [{ weekStart: '2026-08-03', quantity: 1 }] })).status).toBe('applied');
    expect(applyOrderLine(s, line({ orderId: 'NEW', orderedAt: '2026-08-03T09:00:00+02:00', requestedDate: '2026-08-05' })).status).toBe('applied');
    const out = pruneLocationState(s, dayNumber('2026-08-05'));
    expect(out.lineRows).toBe(1);
    expect(out.baselineVersions).toBe(1);
    const series = s.series.get(ITEM)!;
    expect(series.lines.length).toBe(1);
    expect(series.baselines.map((b) => b.version)).toEqual([2]);
    // The kept line is still remembered: sending it again changes nothing.
    expect(applyOrderLine(s, line({ orderId: 'NEW', orderedAt: '2026-08-03T09:00:00+02:00', requestedDate: '2026-08-05' })).status).toBe('duplicate');
  });

  it('applies new master data from then on', () => {
    const s = createLocationState(MASTER);
    expect(applyLocationMaster(s, MASTER).status).toBe('duplicate');
    expect(applyLocationMaster(s, { ...MASTER, weekStart: 'sunday' }).status).toBe('applied');
    expect(s.calendar.weekStart).toBe(7);
  });
});
