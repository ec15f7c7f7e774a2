import { describe, expect, it } from 'vitest';
import { benjaminiHochberg } from '../../../src/monitoring/benjamini-hochberg.ts';

// Benjamini & Hochberg (1995) step-up rule: with m sorted p-values reject the i smallest, i the largest rank with
// p_(i) ≤ i·q/m. Values below are worked by hand.

describe('Benjamini–Hochberg', () => {
  it('rejects the hypotheses up to the largest rank under its threshold and adjusts the rest', () => {
    // By hand, q = 0.05, m = 5: sorted 0.004 ≤ 0.01, 0.012 ≤ 0.02, 0.029 ≤ 0.03, 0.041 > 0.04, 0.5 > 0.05 → 3 rejected.
    // Adjusted (min over j ≥ i of m·p_(j)/j): 0.02, 0.03, 0.048333…, 0.05125, 0.5.
    const r = benjaminiHochberg([0.012, 0.041, 0.029, 0.004, 0.5], 0.05);
    expect(r.rejected).toEqual([true, false, true, true, false]);
    const expected = [0.03, 0.05125, 0.145 / 3, 0.02, 0.5];
    r.adjusted.forEach((a, i) => expect(a).toBeCloseTo(expected[i]!, 12));
  });

  it('steps up: a p-value above its own threshold is rejected when a larger one passes its threshold', () => {
    // By hand, q = 0.05, m = 2: 0.03 > 0.025 but 0.035 ≤ 0.05, so both go.
    expect(benjaminiHochberg([0.035, 0.03], 0.05).rejected).toEqual([true, true]);
  });

  it('rejects nothing when every p-value is above its threshold, and handles an empty family', () => {
    expect(benjaminiHochberg([0.02, 0.9, 0.5], 0.05).rejected).toEqual([false, false, false]);
    expect(benjaminiHochberg([], 0.05)).toEqual({ rejected: [], adjusted: [] });
  });

  it('treats a missing p-value as no evidence', () => {
    expect(benjaminiHochberg([Number.NaN, 0.0001], 0.05).rejected).toEqual([false, true]);
  });
});
