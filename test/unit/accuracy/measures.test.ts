import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { addError, bandCoverage, bandHit, bias, biasOf, emptyErrorSums, fva, wape, wapeOf } from '../../../src/accuracy/measures.ts';

// Source for every check marked "FPP2": Hyndman & Athanasopoulos, Forecasting: Principles and Practice, 2nd ed.,
// §3.4 and §7.1, as stored in test/reference/accuracy-measures-example.json (see its `source` fields).
// FPP2 errors are e = actual − forecast, ours forecast − actual, so ME = −bias·Σa/n; WAPE = MAE·n/Σa.
const ref = JSON.parse(
  readFileSync(new URL('../../reference/accuracy-measures-example.json', import.meta.url), 'utf8'),
) as {
  data: { goog200: number[] };
  expected: { training_accuracy: Record<'mean' | 'naive' | 'drift', { ME: number; MAE: number; MASE: number }> };
  derived_not_published: { training_WAPE_pct: Record<'naive' | 'drift', number> };
  additional_examples: { data: Record<string, number[]>; expected: Record<string, unknown> }[];
};

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const sum = (xs: number[]): number => xs.reduce((a, b) => a + b, 0);

describe('WAPE and bias against published examples', () => {
  const y = ref.data.goog200;
  const actual = y.slice(1);
  const naive = y.slice(0, -1);
  const slope = (y[y.length - 1]! - y[0]!) / (y.length - 1);
  const drift = naive.map((v) => v + slope);
  const n = actual.length;
  const published = ref.expected.training_accuracy;

  it('gives the naive method’s WAPE from its published MAE (FPP2 goog200)', () => {
    // Printed to 7 significant digits, so agreement to 1e-6 relative.
    expect(rel(wape(naive, actual)!, (published.naive.MAE * n) / sum(actual))).toBeLessThan(1e-6);
    // Extra check: the file's derived (not published) WAPE, 0.844732 %.
    expect(wape(naive, actual)! * 100).toBeCloseTo(ref.derived_not_published.training_WAPE_pct.naive, 5);
  });

  it('gives the naive method’s bias from its published mean error, with the sign flipped (FPP2 goog200)', () => {
    expect(rel(bias(naive, actual)!, (-published.naive.ME * n) / sum(actual))).toBeLessThan(1e-6);
    expect(bias(naive, actual)!).toBeLessThan(0); // a random walk on a rising series under-forecasts
  });

  it('gives zero bias for the drift method, whose published mean error is a floating-point zero (FPP2 goog200)', () => {
    expect(Math.abs(bias(drift, actual)!)).toBeLessThan(1e-12);
  });

  it('gives FVA of drift over naive as 1 − MASE ratio = −0.022378 (FPP2 goog200)', () => {
    // Both are scored on the same periods, so the WAPE ratio equals the MAE ratio and the MASE ratio.
    const expected = 1 - published.drift.MASE / published.naive.MASE;
    expect(fva(wape(naive, actual), wape(drift, actual))!).toBeCloseTo(expected, 6);
    expect(expected).toBeCloseTo(-0.022378, 6);
  });

  it('gives the SES example’s WAPE and bias from its published MAE and ME (FPP2 §7.1)', () => {
    const ex = ref.additional_examples[0]!;
    const a = ex.data.y!;
    const f = ex.data.fitted_one_step!;
    const acc = (ex.expected.training_accuracy as { ME: number; MAE: number });
    // Fitted values are printed to 4 decimals; the file's verification puts the effect at about 6e-6 absolute.
    expect(Math.abs(wape(f, a)! - (acc.MAE * a.length) / sum(a))).toBeLessThan(1e-6);
    expect(Math.abs(bias(f, a)! - (-acc.ME * a.length) / sum(a))).toBeLessThan(1e-6);
  });

  it('gives the exercise’s BIAS −12.43 as an over-forecast (wongsteve.com SES exercise, see the file)', () => {
    const ex = ref.additional_examples[1]!;
    const a = ex.data.actual_periods_2_to_10!;
    const f = ex.data.forecast_unrounded_periods_2_to_10!;
    // Their BIAS = mean(actual − forecast), printed to 2 decimals (half a unit = 0.005).
    const theirBias = (-bias(f, a)! * sum(a)) / a.length;
    expect(Math.abs(theirBias - (ex.expected.BIAS as number))).toBeLessThan(0.005);
    expect(bias(f, a)!).toBeGreaterThan(0);
  });

  it('gives WAPE 6.67 % for the three-item example (askvity, Wikipedia definition; see the file)', () => {
    const ex = ref.additional_examples[2]!;
    expect(wape(ex.data.forecast!, ex.data.actual!)).toBeCloseTo(30 / 450, 15);
    expect(Math.abs(wape(ex.data.forecast!, ex.data.actual!)! * 100 - (ex.expected.WAPE_pct as number))).toBeLessThan(0.005);
  });
});

describe('FVA', () => {
  it('is the share of the baseline’s error removed', () => {
    // Source: IBF FVA example (MAPE 40 % → 38 %, FVA 2 points; see the file). Ours is relative: 2/40 = 5 %.
    expect(fva(0.4, 0.38)).toBeCloseTo(0.05, 15);
    expect(fva(0.2, 0.3)).toBeCloseTo(-0.5, 15);
  });

  it('is undefined when the baseline was perfect or unscored', () => {
    expect(fva(0, 0.1)).toBeNull();
    expect(fva(null, 0.1)).toBeNull();
  });
});

describe('WAPE edge cases', () => {
  it('is undefined without actual volume and names a bad actual', () => {
    expect(wape([1, 2], [0, 0])).toBeNull();
    expect(() => wape([1], [-1])).toThrow(/actual\[0\]/);
    expect(() => bias([1, 2], [1])).toThrow(/2 values for 1 actuals/);
  });

  it('accumulates the same sums incrementally', () => {
    const s = emptyErrorSums();
    addError(s, 90, 100);
    addError(s, 210, 200);
    addError(s, 140, 150);
    expect(wapeOf(s)).toBeCloseTo(30 / 450, 15);
    expect(biasOf(s)).toBeCloseTo(-10 / 450, 15);
  });
});

describe('band coverage', () => {
  it('counts inside as 1, an end as ½ and outside as 0', () => {
    // Source: the counting rule of issue 3 (ties at the band's ends split half in, half out), by hand.
    expect(bandHit(10, 20, 15)).toBe(1);
    expect(bandHit(10, 20, 10)).toBe(0.5);
    expect(bandHit(10, 20, 20)).toBe(0.5);
    expect(bandHit(10, 20, 21)).toBe(0);
    expect(bandHit(0, 0, 0)).toBe(0.5);
    // (1 + ½ + 0 + ½) / 4
    expect(bandCoverage([10, 10, 10, 0], [20, 20, 20, 0], [15, 20, 25, 0])).toBe(0.5);
  });

  it('rejects a band whose ends are reversed', () => {
    expect(() => bandHit(5, 4, 4)).toThrow(/must not exceed/);
  });
});
