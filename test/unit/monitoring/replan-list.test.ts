import { describe, expect, it } from 'vitest';
import { replanEntrySchema } from '../../../src/contracts/replan-entry.ts';
import { monitorDay, type MonitorDayResult } from '../../../src/monitoring/monitor-day.ts';
import { addDays } from '../../../src/monitoring/dates.ts';
import type { MonitorState } from '../../../src/monitoring/state.ts';
import { dayInput, quiet } from './helpers.ts';

// One close a week (each Monday), carrying the week that just completed, scored at lead 1.
const MONDAYS = Array.from({ length: 12 }, (_, i) => addDays('2026-01-05', 7 * i));

function weeks(week: (i: number) => { actual: number; baseline: number; adjusted?: number; version?: number; versionAtLead?: number }) {
  const out: MonitorDayResult[] = [];
  let state: MonitorState | null = null;
  MONDAYS.forEach((monday, i) => {
    const w = week(i);
    const r = monitorDay(
      state,
      dayInput(monday, [
        ...quiet(3),
        {
          item: 'SPARK-LEMON-330',
          intake: 40,
          expected: 40,
          baselineVersion: w.version ?? 1,
          ...(i > 0 ? { weekClosed: { weekStart: addDays(monday, -7), lead: 1, actual: w.actual, baselineAtLead: w.baseline, baselineVersionAtLead: w.versionAtLead ?? w.version ?? 1, adjustedAtLead: w.adjusted ?? w.baseline } } : {}),
        },
      ]),
    );
    state = r.state;
    out.push(r);
  });
  return out;
}

describe('the weekly re-plan list', () => {
  it('lists a baseline that runs persistently low, with Trigg’s signal and the weeks behind it', () => {
    const results = weeks(() => ({ actual: 260, baseline: 200 }));
    for (const r of results) expect(r.replan).toBeDefined();
    const listed = results.map((r) => r.replan!.find((e) => e.item === 'SPARK-LEMON-330'));
    // Not before four weeks since the re-plan (the first Monday scores nothing).
    expect(listed.slice(0, 4).every((e) => e === undefined)).toBe(true);
    const entry = listed.at(-1)!;
    expect(entry).toMatchObject({ reason: 'baseline-bias', direction: 'under', lead: 1, baselineVersion: 1, meanRatio: 1.3, unitsPerWeek: 60 });
    expect(entry.trackingSignal!).toBeGreaterThan(0.51);
    expect(entry.history).toHaveLength(8);
    expect(replanEntrySchema.safeParse(entry).success).toBe(true);
  });

  it('does not list an unbiased baseline whose weeks scatter around it', () => {
    const noise = [12, -9, 4, -14, 7, -3, 10, -6, 2, -11, 8];
    const results = weeks((i) => ({ actual: 200 + (noise[i - 1] ?? 0), baseline: 200 }));
    expect(results.flatMap((r) => r.replan ?? [])).toEqual([]);
  });

  it('restarts after a re-plan: weeks planned on the old version no longer count', () => {
    // Biased for five weeks, then version 2 arrives at the new level; the next two completed weeks were still
    // planned on version 1 at lead 1 (so they are skipped), the weeks after on version 2.
    const results = weeks((i) =>
      i < 6 ? { actual: 260, baseline: 200 } : i < 8 ? { actual: 260, baseline: 200, version: 2, versionAtLead: 1 } : { actual: 260, baseline: 260, version: 2 },
    );
    expect(results[5]!.replan!.some((e) => e.item === 'SPARK-LEMON-330')).toBe(true);
    expect(results.slice(6).flatMap((r) => r.replan!).filter((e) => e.item === 'SPARK-LEMON-330')).toEqual([]);
  });

  it('lists a series that sensing keeps adjusting the same way', () => {
    const results = weeks(() => ({ actual: 200, baseline: 200, adjusted: 240 }));
    const entry = results.at(-1)!.replan!.find((e) => e.item === 'SPARK-LEMON-330')!;
    expect(entry).toMatchObject({ reason: 'persistent-adjustment', direction: 'under', meanRatio: 1.2, unitsPerWeek: 40 });
  });

  it('scores a completed week once even when it is passed again', () => {
    const first = monitorDay(null, dayInput(MONDAYS[1]!, [{ item: 'COLA-1L', intake: 40, expected: 40, weekClosed: { weekStart: MONDAYS[0], lead: 1, actual: 300, baselineAtLead: 200 } }]));
    const again = monitorDay(first.state, dayInput(addDays(MONDAYS[1]!, 1), [{ item: 'COLA-1L', intake: 40, expected: 40, weekClosed: { weekStart: MONDAYS[0], lead: 1, actual: 300, baselineAtLead: 200 } }]));
    expect(again.state.series['COLA-1L']!.trigg!.periods).toBe(1);
    expect(again.replan).toBeUndefined();
  });
});
