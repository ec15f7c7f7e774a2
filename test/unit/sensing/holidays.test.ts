import { describe, expect, it } from 'vitest';
import { createLocationState } from '../../../src/sensing/location-state.ts';
import { dayOf, generateScenario, type SeriesSpec } from './helpers/scenario.ts';
import { applyRecord, leadOf, planAt } from './helpers/run.ts';

describe('holidays', () => {
  it('put nothing on a closed holiday in the daily split, a reduced share on a reduced one, and say so', () => {
    const series: SeriesSpec[] = Array.from({ length: 4 }, (_, i) => ({ item: `CIDER-${i}`, perDay: 40 + 20 * i, noise: 'exact', earlyShare: 0 }));
    const sc = generateScenario({ seed: 1, weeks: 18, series });
    const closed = dayOf(sc, 17, 4); // Friday of next week
    const reduced = dayOf(sc, 17, 3); // Thursday of next week
    const master = { ...sc.master, holidays: [{ date: closed, kind: 'closed' as const }, { date: reduced, kind: 'reduced' as const }] };
    const state = createLocationState(master);
    for (const r of sc.records) applyRecord(state, r);
    const l = leadOf(planAt(state, dayOf(sc, 16, 2)), 'CIDER-0', 1);
    const day = (d: string) => l.daily!.find((x) => x.date === d)!.quantity;
    expect(day(closed)).toBe(0);
    // Flat weekday profile (exact data) over Mon–Thu with Thursday at half capacity: Thursday = ½ of a normal day.
    expect(day(reduced)).toBeCloseTo(day(dayOf(sc, 17, 2)) / 2, 9);
    expect(l.daily!.reduce((s, d) => s + d.quantity, 0)).toBeCloseTo(l.adjusted, 9);
    expect(l.explanation.notes.some((n) => n.startsWith('holiday week: 30% of the open days lost'))).toBe(true);
  });
});
