import { describe, expect, it } from 'vitest';
import { dayOf, generateScenario, type SeriesSpec } from './helpers/scenario.ts';
import { planAt, stateOf } from './helpers/run.ts';

describe('inputs for deviation monitoring', () => {
  const series: SeriesSpec[] = [20, 60].map((perDay, i) => ({ item: `ICED-TEA-${i}`, perDay, noise: 'exact', earlyShare: 0.3 }));
  const sc = generateScenario({ seed: 1, weeks: 18, series });
  const state = stateOf(sc);
  const date = dayOf(sc, 16, 2);
  const result = planAt(state, date);

  it("reports the day's order intake by order date, in total and by customer", () => {
    for (const s of series) {
      // By hand from the records: lines whose orderedAt falls on that local date (written in local time).
      const placed = sc.records.filter((r) => r.kind === 'order-line' && r.record.item === s.item && r.record.orderedAt.startsWith(date));
      const total = placed.reduce((t, r) => t + ((r.record as { quantity?: number }).quantity ?? 0), 0);
      const m = result.monitoringInputs.find((x) => x.item === s.item)!;
      expect(total).toBeGreaterThan(0);
      expect(m.intake).toBeCloseTo(total, 9);
      expect(m.byCustomer.reduce((t, c) => t + c.intake, 0)).toBeCloseTo(total, 9);
      expect(m.date).toBe(date);
    }
  });

  it('expects, from the baseline and from the plan, the intake a steady week implies for that weekday', () => {
    // Exact steady data: every week is ordered the same way, so the intake profile by lead and weekday turns the
    // weekly plan back into exactly the intake seen on the day.
    for (const m of result.monitoringInputs) {
      expect(m.expectedIntakeFromBaseline).toBeCloseTo(m.intake, 6);
      expect(m.expectedIntakeFromPlan).toBeCloseTo(m.intake, 6);
    }
    const previous = planAt(state, dayOf(sc, 16, 1));
    const withPrevious = planAt(state, date, undefined, { previousPlans: previous.plans });
    for (const m of withPrevious.monitoringInputs) expect(m.expectedIntakeFromPlan).toBeCloseTo(m.intake, 6);
    expect(withPrevious.plans.every((p) => p.moved === false && p.largestMove < 1e-6)).toBe(true);
  });
});
