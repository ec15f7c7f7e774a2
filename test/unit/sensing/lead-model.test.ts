import { describe, expect, it } from 'vitest';
import { createLocationState } from '../../../src/sensing/location-state.ts';
import { fitLeadModel } from '../../../src/sensing/lead-model.ts';
import { recomputeContext } from '../../../src/sensing/recompute-context.ts';
import { DEFAULT_SENSING_SETTINGS } from '../../../src/sensing/settings.ts';
import type { TrainingRows } from '../../../src/sensing/training-rows.ts';
import { FEATURE_COUNT, FEATURE_PRIOR } from '../../../src/sensing/features.ts';
import { solveWls } from '../../../src/stats/wls.ts';
import { createRng, sampleNormal } from '../../../src/stats/random.ts';
import { closeOf, dayOf, generateScenario } from './helpers/scenario.ts';

/** Training rows whose target ratio is 1 + βl·x_location + βs·x_series + noise (other terms 0). */
function rowsWith(n: number, betaLocation: number, betaSeries: number, seriesSd: number): TrainingRows {
  const rng = createRng(5);
  const columns = Array.from({ length: FEATURE_COUNT }, () => new Float64Array(n));
  const y = new Float64Array(n);
  for (let r = 0; r < n; r++) {
    const x1 = 0.05 * sampleNormal(rng);
    const x2 = seriesSd * sampleNormal(rng);
    columns[1]![r] = x1;
    columns[2]![r] = x2;
    y[r] = 1 + betaLocation * x1 + betaSeries * x2 + 0.02 * sampleNormal(rng);
  }
  const ones = new Float64Array(n).fill(1);
  return {
    lead: 4,
    n,
    columns,
    y,
    weight: ones,
    seriesIndex: Int32Array.from({ length: n }, (_, r) => r % 10),
    weeksAgo: Int32Array.from({ length: n }, (_, r) => 1 + Math.floor(r / 10)),
    baseline: new Float64Array(n).fill(100),
    demand: Float64Array.from(y, (v) => 100 * v),
    booked: new Float64Array(n),
    toDate: new Float64Array(n),
    perDay: new Float64Array(n).fill(20),
    recency: ones,
    small: new Uint8Array(n),
    series: 10,
  };
}

function context() {
  const sc = generateScenario({ seed: 3, weeks: 12, series: [{ item: 'TONIC-1', perDay: 20 }] });
  const date = dayOf(sc, 10, 2);
  return recomputeContext(createLocationState(sc.master).calendar, { planDate: date, knownAt: closeOf(date) }, DEFAULT_SENSING_SETTINGS);
}

describe('the lead model fit', () => {
  it('keeps the level terms non-negative: a term the data would make negative is left out and the rest refitted', () => {
    const ctx = context();
    const rows = rowsWith(80, -4, 0, 0);
    // Unconstrained (same columns, weights and prior targets; no winsorising, which cannot flip a slope this steep),
    // the location-level slope comes out negative: the case being guarded.
    const free = solveWls({ columns: rows.columns, y: Float64Array.from(rows.y, (v) => v - 1), weights: rows.weight, intercept: false, ridge: { strength: new Array(FEATURE_COUNT).fill(1), target: [...FEATURE_PRIOR] } });
    expect(free.coefficients[1]!).toBeLessThan(0);
    const model = fitLeadModel(rows, 0.97, ctx);
    expect(model.fitted).toBe(true);
    expect(model.coefficients[1]).toBe(0);
    expect(model.coefficients[2]!).toBeGreaterThanOrEqual(0);
    // With the term out, a location-wide rise of 30% leaves the plan at the baseline instead of cutting it.
    expect(1 + model.coefficients[1]! * 0.3).toBe(1);
  });

  it('never lets the series term outweigh the location term, so a location-wide rise lowers no series', () => {
    // Series deviations carry strongly here (slope 1.5) and location moves weakly (0.3): fitted freely, a series
    // that does not share a location-wide rise of R − 1 (its series term is about −(R − 1)) would be planned at
    // 1 + (0.3 − 1.5)·(R − 1), below its baseline. The two terms then share one coefficient.
    const rows = rowsWith(120, 0.3, 1.5, 0.05);
    const free = solveWls({ columns: rows.columns, y: Float64Array.from(rows.y, (v) => v - 1), weights: rows.weight, intercept: false, ridge: { strength: new Array(FEATURE_COUNT).fill(1), target: [...FEATURE_PRIOR] } });
    expect(free.coefficients[2]!).toBeGreaterThan(free.coefficients[1]!);
    const model = fitLeadModel(rows, 0.97, context());
    expect(model.coefficients[1]).toBe(model.coefficients[2]);
    expect(model.coefficients[1]!).toBeGreaterThan(0.3);
    expect(model.coefficients[1]!).toBeLessThan(1.5);
    const rise = 0.3;
    expect(model.coefficients[1]! * rise + model.coefficients[2]! * -rise).toBeGreaterThanOrEqual(0);
  });
});
