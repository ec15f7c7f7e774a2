import { describe, expect, it } from 'vitest';
import { dayNumber } from '../../../src/calendar/day-number.ts';
import { keptSignalCounts } from '../../../src/sensing/as-of-cache.ts';
import { applyBaselineVersion } from '../../../src/sensing/apply-baseline.ts';
import { applyOrderLine } from '../../../src/sensing/apply-order-line.ts';
import { applyShipment } from '../../../src/sensing/apply-shipment.ts';
import { createLocationState, type ApplyOptions, type LocationState } from '../../../src/sensing/location-state.ts';
import { pruneLocationState } from '../../../src/sensing/prune.ts';
import { senseLocation } from '../../../src/sensing/sense-location.ts';
import { sensingSettings, type SensingSettings } from '../../../src/sensing/settings.ts';
import { cloneLocationState } from '../../../src/sensing/snapshot.ts';
import { createRng } from '../../../src/stats/random.ts';
import { closeOf, dayOf, generateScenario, type ScenarioRecord, type SeriesSpec } from './helpers/scenario.ts';

function apply(state: LocationState, r: ScenarioRecord, options?: ApplyOptions): void {
  const out =
    r.kind === 'order-line' ? applyOrderLine(state, r.record, options) : r.kind === 'shipment' ? applyShipment(state, r.record, options) : applyBaselineVersion(state, r.record, options);
  if (out.status === 'rejected') throw new Error(`${out.code} ${out.message}`);
}

const BASES: [string, SensingSettings | undefined][] = [
  ['orders', undefined],
  ['shipments', sensingSettings({ demandBasis: 'shipments' })],
];

describe('signals kept between closes', () => {
  it.each(BASES)(
    'give (%s basis) the same plans at every daily close as a fresh copy of the state that keeps nothing, with late records, a new series and a prune',
    (_basis, settings) => {
      const series: SeriesSpec[] = Array.from({ length: 10 }, (_, i) => ({
        item: `TONIC-${i}`,
        perDay: [2, 12, 40, 150, 6][i % 5]!,
        noise: 0.05,
        earlyShare: 0.3,
        reviseShare: 0.2,
        wobble: 0.03,
        level: (w: number) => (i % 3 === 0 && w >= 17 ? 1.3 : 1),
        // A series that starts in the middle of the daily run: the input set changes under the kept signals.
        ...(i === 9 ? { startWeek: 22 } : {}),
      }));
      const sc = generateScenario({ seed: 31, weeks: 24, series, withShipments: settings !== undefined });
      const start = dayOf(sc, 18, 0);
      const state = createLocationState(sc.master, settings);
      const rng = createRng(5);
      // Records after the start: most arrive on time. The feed stalls on two days (one of them a Monday, when the baseline versions are published): their records arrive three
      // days later with their own (past) knowledge time, as an event-time replay applies a catch-up. One in 12
      // arrives two to nine days late and counts from its arrival; one in 12 arrives at 23:30, after the 23:00 close
      // instant but before the close runs (so the close must not keep its own signals as the day's final ones).
      const pending: Array<{ r: ScenarioRecord; dueMs: number; own: boolean }> = [];
      const HOUR = 3_600_000;
      const stalled = new Set([dayOf(sc, 19, 0), dayOf(sc, 20, 2)]); // a Monday brings the week's baseline version
      for (const r of sc.records) {
        if (r.knownMs <= closeOf(start)) {
          apply(state, r);
          continue;
        }
        const u = rng.next();
        const delayDays = 2 + Math.floor(rng.next() * 8);
        const day = new Date(r.knownMs + HOUR).toISOString().slice(0, 10); // Berlin local date (UTC+1/+2)
        if (stalled.has(day)) pending.push({ r, dueMs: r.knownMs + 3 * 86_400_000, own: true });
        else if (u < 1 / 12) pending.push({ r, dueMs: r.knownMs + delayDays * 86_400_000, own: false });
        else if (u < 2 / 12) pending.push({ r, dueMs: Math.max(r.knownMs, closeOf(day) + HOUR / 2), own: false });
        else pending.push({ r, dueMs: r.knownMs, own: false });
      }
      pending.sort((a, b) => a.dueMs - b.dueMs);
      let next = 0;
      let closes = 0;
      let late = 0;
      let fixes = 0;
      // A close reuses its scratch memory at the next one: what it returned must not be a view into it.
      let previous: { result: ReturnType<typeof senseLocation>; text: string } | undefined;
      let afterPrune = { reused: 0, computed: 0 };
      for (let k = 1; k <= 25; k++) {
        const d = dayOf(sc, 18, k);
        while (next < pending.length && pending[next]!.dueMs <= closeOf(d) + HOUR) {
          const p = pending[next++]!;
          if (p.dueMs !== p.r.knownMs) late++;
          apply(state, p.r, p.own || p.dueMs === p.r.knownMs ? undefined : { knownAt: p.dueMs });
        }
        // A correction at 23:30 to a line of last week: known on d, after the close instant, before the close runs.
        const fixed = sc.records.find(
          (r) => r.kind === 'order-line' && r.record.revision === 1 && r.record.requestedDate === dayOf(sc, 17, k % 7 < 5 ? k % 7 : 0) && r.record.item === 'TONIC-3',
        );
        if (fixed?.kind === 'order-line') {
          const at = new Date(closeOf(d) + HOUR / 2).toISOString();
          apply(state, { ...fixed, record: { ...fixed.record, eventId: `fix-${k}`, revision: 50 + k, quantity: 2 * (fixed.record.quantity ?? 1), changedAt: at } });
          fixes++;
        }
        if (k === 14) pruneLocationState(state, dayNumber(d));
        if (k % 7 >= 5) continue;
        const asOf = { planDate: d, knownAt: closeOf(d) };
        const before = keptSignalCounts(state);
        const kept = senseLocation(state, asOf, settings);
        if (k === 14) afterPrune = { reused: keptSignalCounts(state).reused - before.reused, computed: keptSignalCounts(state).computed - before.computed };
        const fresh = senseLocation(cloneLocationState(state), asOf, settings);
        expect(kept.plans).toEqual(fresh.plans);
        expect(kept.model).toEqual(fresh.model);
        if (previous) expect(JSON.stringify(previous.result)).toBe(previous.text);
        previous = { result: kept, text: JSON.stringify(kept) };
        closes++;
      }
      expect(closes).toBe(19);
      expect(late).toBeGreaterThan(50);
      expect(fixes).toBeGreaterThan(10);
      // The comparison means something only if kept signals were in fact reused, and also thrown away.
      const counts = keptSignalCounts(state);
      expect(counts.reused).toBeGreaterThan(40);
      expect(counts.computed).toBeGreaterThan(19);
      // The prune keeps the kept signals (here it drops no line, only baseline weeks before the window).
      expect(afterPrune.reused).toBeGreaterThanOrEqual(15);
    },
  );

  it('are dropped when a record known on their day arrives after it was closed', () => {
    const series: SeriesSpec[] = Array.from({ length: 6 }, (_, i) => ({ item: `TONIC-${i}`, perDay: 40 + 30 * i, noise: 0.05, earlyShare: 0.3 }));
    const sc = generateScenario({ seed: 8, weeks: 22, series });
    const D = dayOf(sc, 19, 1);
    const state = createLocationState(sc.master);
    const held: ScenarioRecord[] = [];
    for (const r of sc.records) if (r.knownMs <= closeOf(D)) apply(state, r);
    else held.push(r);
    senseLocation(state, { planDate: D, knownAt: closeOf(D) });
    // A correction known on D (15:00) to a line of the week before, delivered only after D's close with its own time.
    const line = sc.records.find((r) => r.kind === 'order-line' && r.record.item === 'TONIC-2' && r.record.requestedDate === dayOf(sc, 18, 2));
    if (line?.kind !== 'order-line') throw new Error('no line to correct');
    const at = new Date(closeOf(D) - 8 * 3_600_000).toISOString();
    apply(state, { ...line, record: { ...line.record, eventId: 'late-fix', revision: 9, quantity: 4 * (line.record.quantity ?? 1), changedAt: at } });
    const next = dayOf(sc, 20, 1);
    for (const r of held) if (r.knownMs <= closeOf(next)) apply(state, r);
    const before = keptSignalCounts(state);
    const asOf = { planDate: next, knownAt: closeOf(next) };
    const kept = senseLocation(state, asOf);
    expect(kept.plans).toEqual(senseLocation(cloneLocationState(state), asOf).plans);
    // Every older as-of day came from the earlier close; D itself (index 1) was computed again.
    const after = keptSignalCounts(state);
    expect(after.reused - before.reused).toBe(16);
    expect(after.computed - before.computed).toBe(1);
  });

  it.each(BASES)(
    'survive (%s basis) a prune that drops old rows, except the days whose windows read a line the prune makes look different',
    (_basis, settings) => {
      // C-ONCE orders in week 3 and again in week 12: once week 3 is pruned, its week-12 line is a customer's first
      // fill. C-BIG orders 100 in weeks 2-4 and 250 in week 12: against its own history the 250 is ordinary, but with
      // weeks 2-4 pruned it is weighed against the series' small lines and becomes a large line. The days whose
      // recent windows read week 12 must be computed again; the rest stay.
      const series: SeriesSpec[] = Array.from({ length: 6 }, (_, i) => ({
        item: `TONIC-${i}`,
        perDay: [8, 30, 60, 120, 15, 45][i]!,
        noise: 0.05,
        earlyShare: 0.3,
        reviseShare: 0.2,
        ...(i === 2 ? {
              extraLines: [
                [3, 2, 40, 'C-ONCE'],
                [12, 2, 40, 'C-ONCE'],
                [2, 3, 100, 'C-BIG'],
                [3, 3, 100, 'C-BIG'],
                [4, 3, 100, 'C-BIG'],
                [12, 3, 250, 'C-BIG'],
              ] as [number, number, number, string][],
            } : {}),
      }));
      const sc = generateScenario({ seed: 12, weeks: 40, series, withShipments: settings !== undefined });
      const state = createLocationState(sc.master, settings);
      const pruneDay = dayOf(sc, 36, 0);
      let next = 0;
      const feed = (until: number) => {
        while (next < sc.records.length && sc.records[next]!.knownMs <= until) apply(state, sc.records[next++]!);
      };
      let reusedAfterPrune = 0;
      let computedAfterPrune = 0;
      let dropped = 0;
      for (let k = -7; k <= 4; k++) {
        const d = dayOf(sc, 36, k);
        if ((k + 7) % 7 >= 5) continue;
        feed(closeOf(d));
        const asOf = { planDate: d, knownAt: closeOf(d) };
        const before = keptSignalCounts(state);
        const kept = senseLocation(state, asOf, settings);
        expect(kept.plans).toEqual(senseLocation(cloneLocationState(state), asOf, settings).plans);
        if (d === pruneDay) {
          dropped = pruneLocationState(state, dayNumber(d)).lineRows;
        } else if (k === 1) {
          reusedAfterPrune = keptSignalCounts(state).reused - before.reused;
          computedAfterPrune = keptSignalCounts(state).computed - before.computed;
        }
      }
      expect(dropped).toBeGreaterThan(100);
      // Of the 17 past as-of days the close after the prune trains on, the oldest read week 12 again.
      expect(computedAfterPrune).toBeGreaterThan(0);
      expect(reusedAfterPrune).toBeGreaterThan(8);
      expect(reusedAfterPrune + computedAfterPrune).toBe(17);
    },
  );
});
