import { describe, expect, it } from 'vitest';
import { applyBaselineVersion } from '../../../src/sensing/apply-baseline.ts';
import { dayOf, generateScenario, type SeriesSpec } from './helpers/scenario.ts';
import { leadOf, planAt, stateOf } from './helpers/run.ts';

// Every fallback of the ladder names itself in the output. Exact counts make the right numbers easy to work out.
const stable = (n: number, perDay = 40): SeriesSpec[] => Array.from({ length: n }, (_, i) => ({ item: `COLA-1L-${i}`, perDay, noise: 'exact', earlyShare: 0.2 }));

describe('the fallback ladder', () => {
  it('plans a series without a baseline at its recent run-rate, first-fill orders left out', () => {
    // 20 a day on 5 business days: a run-rate of 100 a week (the customers' first orders lie weeks back).
    const series = [...stable(4), { item: 'NEW-FLAVOUR', perDay: 20, noise: 'exact' as const, earlyShare: 0, noBaseline: true }];
    const sc = generateScenario({ seed: 1, weeks: 16, series });
    const result = planAt(stateOf(sc), dayOf(sc, 14, 2));
    const plan = result.plans.find((p) => p.item === 'NEW-FLAVOUR')!;
    for (const l of plan.leads.slice(2)) {
      expect(l.baseline).toBeNull();
      expect(l.explanation.fallback).toBe('no-baseline');
      expect(l.explanation.method).toBe('run-rate');
      expect(l.adjusted).toBeCloseTo(100, 9);
    }
  });

  it('updates the baseline of a new series by its first weeks of orders (gamma–Poisson, baseline as prior)', () => {
    // Baseline 100 a week; the series starts in week 14 ordering 40 a day. On Wednesday of week 16 two complete
    // weeks say N = 400 against M = 200 expected; the prior is worth 2 weeks of baseline (α = 200), so
    // ratio = (400 + 200) / (200 + 200) = 1.5 and an unbooked week is planned at 150.
    const series = [...stable(4), { item: 'NEW-SERIES', perDay: 20, noise: 'exact' as const, earlyShare: 0, startWeek: 14, level: () => 2 }];
    const sc = generateScenario({ seed: 1, weeks: 18, series });
    const l = leadOf(planAt(stateOf(sc), dayOf(sc, 16, 2)), 'NEW-SERIES', 3);
    expect(l.explanation.fallback).toBe('new-series');
    expect(l.explanation.method).toBe('gamma-poisson');
    expect(l.explanation.predictedRatio).toBeCloseTo(1.5, 12);
    expect(l.adjusted).toBeCloseTo(150, 9);
  });

  it('passes the baseline through for a small series without strong exact-test evidence', () => {
    const series = [...stable(4), { item: 'RARE-SYRUP', perDay: 0.5, noise: 0, earlyShare: 0 }];
    const sc = generateScenario({ seed: 3, weeks: 18, series });
    const l = leadOf(planAt(stateOf(sc), dayOf(sc, 16, 2)), 'RARE-SYRUP', 4);
    expect(l.explanation.fallback).toBe('small-series');
    expect(l.adjusted).toBe(l.baseline);
  });

  it('moves a small series when the exact count test is significant, within the absolute guardrail', () => {
    // Baseline 2.5 a week, demand exactly 10 a week: over 8 weeks N = 80 against M = 20 (p ≈ 0). Posterior ratio
    // (80 + 5) / (20 + 5) = 3.4 → 8.5 a week, above the upper bound max(2 × 2.5, 2.5 + 5) = 7.5: it stops there.
    const series = [...stable(4), { item: 'RARE-SYRUP', perDay: 0.5, noise: 'exact' as const, earlyShare: 0, lineSize: 1, level: () => 4 }];
    const sc = generateScenario({ seed: 3, weeks: 18, series });
    const l = leadOf(planAt(stateOf(sc), dayOf(sc, 16, 2)), 'RARE-SYRUP', 4);
    expect(l.explanation.method).toBe('small-series-exact-test');
    expect(l.explanation.predictedRatio).toBeCloseTo(3.4, 12);
    expect(l.explanation.guardrail).toBe('absolute-upper');
    expect(l.adjusted).toBeCloseTo(7.5, 12);
  });

  it('leaves the baseline unchanged (above the surviving book) where the location has too few training rows', () => {
    const sc = generateScenario({ seed: 1, weeks: 16, series: [{ item: 'ONLY-ITEM', perDay: 30, noise: 0.05, earlyShare: 0.2, level: () => 1.3 }] });
    const result = planAt(stateOf(sc), dayOf(sc, 14, 2));
    for (const l of result.plans[0]!.leads) {
      expect(l.explanation.fallback).toBe('location-unfit');
      expect(l.adjusted).toBeCloseTo(Math.max(l.baseline!, l.explanation.survivingOrderBook), 9);
    }
    expect(result.model.every((m) => m.fallback === 'location-unfit')).toBe(true);
  });

  it('hands a lead back to the baseline when the self-check says so, and names it', () => {
    const series = stable(6).map((s) => ({ ...s, noise: 0.05 as const, level: () => 1.3 }));
    const sc = generateScenario({ seed: 2, weeks: 16, series });
    const result = planAt(stateOf(sc), dayOf(sc, 14, 2), undefined, { selfCheckFallbacks: [2] });
    for (const plan of result.plans) {
      const l = plan.leads[2]!;
      expect(l.explanation.fallback).toBe('self-check');
      expect(l.adjusted).toBeCloseTo(Math.max(l.baseline!, l.explanation.survivingOrderBook), 9);
      expect(plan.leads[3]!.explanation.fallback).toBeNull();
      expect(plan.leads[3]!.adjusted / plan.leads[3]!.baseline!).toBeGreaterThan(1.15);
    }
    expect(result.model[2]!.fallback).toBe('self-check');
  });

  it('takes a week the current baseline version lacks from the version before, rebased to the current level', () => {
    const sc = generateScenario({ seed: 1, weeks: 16, series: stable(5) });
    const state = stateOf(sc);
    // A late re-plan of COLA-1L-0 from 200 to 220 a week (×1.1) covering only this week and the next two.
    const out = applyBaselineVersion(state, {
      eventId: 'replan-1',
      location: 'DC-NORTH',
      item: 'COLA-1L-0',
      version: 99,
      publishedAt: `${dayOf(sc, 14, 1)}T06:00:00+01:00`,
      weeks: [0, 1, 2].map((k) => ({ weekStart: dayOf(sc, 14 + k, 0), quantity: 220 })),
    } as never);
    expect(out.status).toBe('applied');
    const plan = planAt(state, dayOf(sc, 14, 2)).plans.find((p) => p.item === 'COLA-1L-0')!;
    expect(plan.leads[2]!.baseline).toBe(220);
    expect(plan.leads[2]!.explanation.fallback).toBeNull();
    // Weeks 3 and 4 come from the previous version (200 a week), rebased by 220/200 over the weeks both cover.
    for (const l of plan.leads.slice(3)) {
      expect(l.explanation.fallback).toBe('missing-baseline-week');
      expect(l.baseline).toBeCloseTo(220, 9);
    }
  });
});
