import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import jStat from 'jstat';
import {
  MAD_TO_SIGMA,
  mad,
  median,
  quantile,
  robustSigma,
  weightedMean,
  weightedQuantile,
  weightedQuantiles,
  winsoriseByQuantiles,
  winsoriseByRobustZ,
} from '../../../src/stats/robust.ts';
import { createRng, sampleNormal } from '../../../src/stats/random.ts';

describe('weighted mean', () => {
  it('weights each value by its weight', () => {
    // Source: by hand, (1·1 + 3·3) / 4 = 2.5.
    expect(weightedMean([1, 3], [1, 3])).toBe(2.5);
    expect(weightedMean([1, 2, 3, 4])).toBe(2.5);
  });

  it('keeps digits when values sit on a large offset', () => {
    // Source: by hand; the mean of 1e12 + {0.1, 0.2, 0.3} is 1e12 + 0.2.
    expect(weightedMean([1e12 + 0.1, 1e12 + 0.2, 1e12 + 0.3]) - 1e12).toBeCloseTo(0.2, 3);
  });

  it('is NaN without any positive weight', () => {
    expect(weightedMean([1, 2], [0, 0])).toBeNaN();
  });
});

describe('quantiles and median', () => {
  it('shares the weight of tied values, so their order and a rounding-level split of the tie change nothing', () => {
    // Source: by hand. Values 1, 2, 2, 3 with weights 1, (1, 3), 1: total 6, the tie group holds 4, shared 2 and 2,
    // so the points sit at 0.5/6, 2/6, 4/6 and 5.5/6, and p = 0.75 lies a third of the way from (4/6, 2) to
    // (5.5/6, 3): 2 + 1/3. Without sharing, the two orders of the tie would give 2.5 and 2.
    expect(weightedQuantile([1, 2, 2, 3], [1, 1, 3, 1], 0.75)).toBeCloseTo(7 / 3, 12);
    expect(weightedQuantile([1, 2, 2, 3], [1, 3, 1, 1], 0.75)).toBeCloseTo(7 / 3, 12);
    // The same ratio computed from quantities scaled by a constant can differ in its last bits (seen: 1.2333333333333338
    // and 1.2333333333333343 for 37/30); values two ulps apart are the same observation.
    const a = 37 / 30;
    const b = a * (1 + 2 * Number.EPSILON);
    expect(a).not.toBe(b);
    const lo = Math.min(a, b);
    const hi = Math.max(a, b);
    expect(weightedQuantile([1, hi, lo, 1.5], [1, 1, 3, 1], 0.75)).toBeCloseTo(weightedQuantile([1, a, a, 1.5], [1, 1, 3, 1], 0.75), 12);
  });

  it('takes the average of the middle two as the median of an even sample', () => {
    expect(median([4, 1, 3, 2])).toBe(2.5);
    expect(median([5, 1, 3])).toBe(3);
  });

  it('agrees with jstat’s median on random samples', () => {
    // Source: jstat 1.9.6 median.
    const rng = createRng(8);
    for (let t = 0; t < 20; t++) {
      const xs = Array.from({ length: 3 + t }, () => sampleNormal(rng));
      expect(median(xs)).toBeCloseTo(jStat.median(xs), 14);
    }
  });

  it('interpolates between plotting positions (i − ½)/n (Hyndman & Fan type 5)', () => {
    // Source: by hand for 1..10 — p = 0.1 lies halfway between positions 0.05 (1) and 0.15 (2).
    const xs = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
    expect(quantile(xs, 0.1)).toBeCloseTo(1.5, 14);
    expect(quantile(xs, 0.9)).toBeCloseTo(9.5, 14);
    expect(quantile(xs, 0.01)).toBe(1);
    expect(quantile(xs, 1)).toBe(10);
  });

  it('places each value at the centre of its weight', () => {
    // Source: by hand — values 1, 3 with weights 3, 1 sit at 1.5/4 = 0.375 and 3.5/4 = 0.875;
    // p = 0.5 is a quarter of the way: 1 + 0.25·2 = 1.5.
    expect(weightedQuantile([3, 1], [1, 3], 0.5)).toBeCloseTo(1.5, 14);
    expect(weightedQuantile([1, 2, 100], [1, 1, 0], 0.99)).toBe(2);
  });

  it('is monotone in p and stays within the sample range', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.double({ min: 0.01, max: 10, noNaN: true })), {
          minLength: 1,
          maxLength: 40,
        }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (pairs, p1, p2) => {
          const xs = pairs.map((p) => p[0]);
          const ws = pairs.map((p) => p[1]);
          const [a, b] = weightedQuantiles(xs, ws, [Math.min(p1, p2), Math.max(p1, p2)]);
          return a! <= b! + 1e-9 && a! >= Math.min(...xs) && b! <= Math.max(...xs);
        },
      ),
    );
  });
});

describe('MAD and robust sigma', () => {
  it('gives the MAD of 1, 1, 2, 2, 4, 6, 9 as 1', () => {
    // Source: by hand — median 2, absolute deviations 1, 1, 0, 0, 2, 4, 7, their median 1.
    expect(mad([1, 1, 2, 2, 4, 6, 9])).toBe(1);
    expect(robustSigma([1, 1, 2, 2, 4, 6, 9])).toBeCloseTo(1.482602218505602, 12);
  });

  it('estimates σ of normal data to within a few percent', () => {
    const rng = createRng(21);
    const xs = Array.from({ length: 20_000 }, () => 5 + 2 * sampleNormal(rng));
    expect(robustSigma(xs)).toBeGreaterThan(1.94);
    expect(robustSigma(xs)).toBeLessThan(2.06);
    // Source: MAD_TO_SIGMA = 1/Φ⁻¹(0.75), Φ⁻¹ from jstat 1.9.6 normal.inv.
    expect(MAD_TO_SIGMA).toBeCloseTo(1 / jStat.normal.inv(0.75, 0, 1), 12);
  });

  it('falls back to the mean absolute deviation when most values are equal', () => {
    // Source: by hand — median 0, MAD 0; mean |x| = 10/5 = 2, × √(π/2).
    expect(robustSigma([0, 0, 0, 0, 10])).toBeCloseTo(2 * Math.sqrt(Math.PI / 2), 14);
  });
});

describe('winsorising', () => {
  it('moves values beyond the quantile limits to the limits', () => {
    const xs = [1, 2, 3, 4, 5, 6, 7, 8, 9, 100];
    const w = winsoriseByQuantiles(xs, { lowerP: 0.1, upperP: 0.9 });
    expect(w.lower).toBeCloseTo(1.5, 14);
    expect(w.upper).toBeCloseTo(54.5, 12); // Source: by hand, halfway between 9 (0.85) and 100 (0.95).
    Array.from(w.values).forEach((v, i) => expect(v).toBeCloseTo([1.5, 2, 3, 4, 5, 6, 7, 8, 9, 54.5][i]!, 12));
    expect(w.clipped).toBe(2);
  });

  it('clips at median ± z robust σ and leaves the input untouched', () => {
    // Source: by hand — median 3, MAD 1 (deviations 2,1,0,1,97 → median 1), σ = 1.4826; upper limit 3 + 3σ.
    const xs = [1, 2, 3, 4, 100];
    const w = winsoriseByRobustZ(xs, 3);
    expect(w.upper).toBeCloseTo(3 + 3 * MAD_TO_SIGMA, 12);
    expect(w.values[4]).toBeCloseTo(3 + 3 * MAD_TO_SIGMA, 12);
    expect(w.clipped).toBe(1);
    expect(xs[4]).toBe(100);
  });

  it('moves nothing when there is no spread', () => {
    expect(winsoriseByRobustZ([2, 2, 2], 3).clipped).toBe(0);
  });

  it('names a bad argument', () => {
    expect(() => median([1, Number.NaN])).toThrow(/values\[1\] must be finite/);
    expect(() => weightedMean([1, 2], [1])).toThrow(/weights has 1 entries/);
    expect(() => winsoriseByQuantiles([1], { lowerP: 0.9, upperP: 0.1 })).toThrow(/lowerP/);
  });
});
