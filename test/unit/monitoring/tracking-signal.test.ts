import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { cumulativeTrackingSignal, triggSignal, triggStart, triggStep } from '../../../src/monitoring/tracking-signal.ts';
import { createRng, sampleNormal } from '../../../src/stats/random.ts';

// Source: test/reference/tracking-signal-example.json — a textbook exercise solution (Brown's cumulative
// signal RSFE/MAD) and Trigg (1964)'s smoothed signal with its published limit 0.51 for β = 0.1, plus the file's
// Monte Carlo plausibility figures for that limit.
const ref = JSON.parse(readFileSync(new URL('../../reference/tracking-signal-example.json', import.meta.url), 'utf8'));

describe("Brown's cumulative tracking signal", () => {
  it('reproduces the textbook RSFE, MAD and signal columns', () => {
    const errors = ref.data.actual.map((a: number, i: number) => a - ref.data.forecast[i]);
    const rows = cumulativeTrackingSignal(errors);
    expect(rows.map((r) => r.rsfe)).toEqual(ref.expected.rsfe);
    rows.forEach((r, i) => {
      expect(Math.abs(r.mad - ref.expected.mad_cumulative[i])).toBeLessThanOrEqual(0.005 + 1e-9);
      // Printed to 1 dp, rounded half away from zero (see the file's verification note).
      expect(Math.abs(r.signal! - ref.expected.tracking_signal[i])).toBeLessThanOrEqual(0.05 + 1e-9);
    });
    expect(ref.data.period[rows.findIndex((r) => Math.abs(r.signal!) > 4)]).toBe(ref.expected.first_period_outside_plus_minus_4);
  });

  it('reproduces the second exercise (April–September) to whole numbers', () => {
    const ex = ref.additional_examples[0];
    const rows = cumulativeTrackingSignal(ex.data.actual.map((a: number, i: number) => a - ex.data.forecast[i]));
    expect(rows.map((r) => r.rsfe)).toEqual(ex.expected.rsfe);
    expect(rows.map((r) => Math.round(r.signal!))).toEqual(ex.expected.tracking_signal_rounded);
  });
});

describe("Trigg's smoothed tracking signal", () => {
  it('follows E_t = βe + (1 − β)E, M_t = β|e| + (1 − β)M by hand', () => {
    // By hand, β = 0.1, M_0 = 10, errors 3, −20, 9 (the textbook's first three):
    // E1 = 0.3, M1 = 0.3 + 9 = 9.3; E2 = −2 + 0.27 = −1.73, M2 = 2 + 8.37 = 10.37; E3 = 0.9 − 1.557 = −0.657,
    // M3 = 0.9 + 9.333 = 10.233; T3 = −0.657 / 10.233 = −0.0642.
    let s = triggStart(10);
    for (const e of [3, -20, 9]) s = triggStep(s, e, 0.1);
    expect(s.e).toBeCloseTo(-0.657, 10);
    expect(s.m).toBeCloseTo(10.233, 10);
    expect(triggSignal(s)).toBeCloseTo(-0.657 / 10.233, 10);
    expect(s.periods).toBe(3);
  });

  it('stays within [−1, 1] and reaches 1 under a constant positive bias', () => {
    let s = triggStart(0);
    for (let i = 0; i < 50; i++) s = triggStep(s, 5, 0.1);
    expect(triggSignal(s)).toBeCloseTo(1, 12);
  });

  it('exceeds 0.51 in about 6.7% of periods for unbiased normal errors with β = 0.1, as the reference Monte Carlo found', () => {
    // Reference verification: 200,000 iid N(0,1) errors, M started at E|e| = √(2/π): share |T| > 0.51 = 0.067,
    // 95th percentile of |T| = 0.539. Our seeded run of the same size must agree within sampling error
    // (neighbouring T are strongly correlated, so the tolerance is wider than a binomial one).
    const rng = createRng(20260302);
    let s = triggStart(Math.sqrt(2 / Math.PI));
    const abs: number[] = [];
    for (let i = 0; i < 200_000; i++) {
      s = triggStep(s, sampleNormal(rng), 0.1);
      abs.push(Math.abs(triggSignal(s)));
    }
    const share = abs.filter((t) => t > ref.additional_examples[1].expected.threshold_abs_T).length / abs.length;
    expect(share).toBeGreaterThan(0.06);
    expect(share).toBeLessThan(0.074);
    abs.sort((a, b) => a - b);
    expect(abs[Math.floor(0.95 * abs.length)]!).toBeCloseTo(0.539, 1);
  });
});
