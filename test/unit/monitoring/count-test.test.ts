import jStat from 'jstat';
import { describe, expect, it } from 'vitest';
import { countTest, normalScore } from '../../../src/monitoring/count-test.ts';
import { negBinomialPmf, poissonPmf } from '../../../src/stats/count-distributions.ts';

// Outside reference: jstat (a general-purpose statistics library) for Poisson and negative-binomial probabilities.
// jstat's negbin(k; r, p) = C(k+r−1, k)·p^r·(1−p)^k, i.e. our (mean, φ) with r = 1/φ and p = r / (r + mean).
const ALPHA = 0.0027;

function jstatPoissonUpper(x: number, mu: number): number {
  // P[X ≥ x] as an explicit sum of jstat's pmf (never 1 − cdf, which loses tiny tails). jstat's pmf goes through
  // k!, finite only up to k = 170, where these tails have long dropped below double precision.
  let s = 0;
  for (let k = x; k <= 170; k++) s += jStat.poisson.pdf(k, mu);
  return s;
}

describe('exact count limits and tail probabilities', () => {
  it.each([
    [0, 2],
    [3, 2],
    [7, 2],
    [12, 2],
    [35, 50],
    [72, 50],
    [90, 50],
    [1, 0.3],
  ])('gives P[X ≥ %i] and P[X ≤ x] of a Poisson with mean %f as jstat does', (x, mu) => {
    const t = countTest(x, mu, 0, ALPHA);
    const upper = jstatPoissonUpper(x, mu);
    expect(t.pUpper / upper).toBeCloseTo(1, 9);
    expect(t.pLower).toBeCloseTo(jStat.poisson.cdf(x, mu), 12);
    expect(t.pTwoSided).toBeCloseTo(Math.min(1, 2 * Math.min(upper, jStat.poisson.cdf(x, mu))), 12);
  });

  it('keeps the digits of a tiny upper tail (a day far above its mean)', () => {
    const t = countTest(150, 50, 0, ALPHA);
    expect(t.pUpper).toBeGreaterThan(0);
    expect(t.pUpper / jstatPoissonUpper(150, 50)).toBeCloseTo(1, 8);
  });

  it('puts the limits where the exact cdf crosses α/2 and 1 − α/2 (checked against jstat)', () => {
    for (const mu of [0.5, 2, 9.5, 50, 110]) {
      const { lower, upper } = countTest(0, mu, 0, ALPHA);
      const cdf = (k: number) => (k < 0 ? 0 : jStat.poisson.cdf(k, mu));
      expect(cdf(lower)).toBeGreaterThanOrEqual(ALPHA / 2);
      expect(cdf(lower - 1)).toBeLessThan(ALPHA / 2);
      expect(cdf(upper)).toBeGreaterThanOrEqual(1 - ALPHA / 2);
      expect(cdf(upper - 1)).toBeLessThan(1 - ALPHA / 2);
    }
  });

  it('does not call 7 units a spike on a mean of 2, which a normal 3σ band would (2 + 3·√2 = 6.2)', () => {
    // jstat: P[X ≥ 7 | 2] = 1 − cdf(6) ≈ 0.0045 > α/2; the exact upper limit is 7, so only 8 or more is beyond it.
    const t = countTest(7, 2, 0, ALPHA);
    expect(t.upper).toBe(7);
    expect(t.pUpper).toBeCloseTo(1 - jStat.poisson.cdf(6, 2), 12);
    expect(t.pUpper).toBeGreaterThan(ALPHA / 2);
    // ...and no day can be a drop on a mean of 2: even zero has P = e^−2 ≈ 0.135.
    expect(countTest(0, 2, 0, ALPHA).pLower).toBeCloseTo(Math.exp(-2), 12);
  });

  it('gives negative-binomial tails as jstat does (mean 8, φ = 0.25, so r = 4 and p = 1/3)', () => {
    const r = 4;
    const p = r / (r + 8);
    for (const x of [0, 2, 8, 20, 40]) {
      const t = countTest(x, 8, 0.25, ALPHA);
      let upper = 0;
      for (let k = x; k < x + 2000; k++) upper += jStat.negbin.pdf(k, r, p);
      expect(t.pUpper / upper).toBeCloseTo(1, 8);
      expect(t.pLower).toBeCloseTo(jStat.negbin.cdf(x, r, p), 10);
    }
  });

  it('counts an item ordered in cases in cases: 48 units in packs of 12 on a mean of 24 is 4 cases on a mean of 2', () => {
    const t = countTest(48, 24, 0, ALPHA, 12);
    expect(t.pUpper).toBeCloseTo(1 - jStat.poisson.cdf(3, 2), 12);
    expect(t.upper).toBe(7 * 12);
  });

  it('tests fractional quantities at the nearest whole count on each side', () => {
    const t = countTest(6.5, 2, 0, ALPHA);
    expect(t.pUpper).toBeCloseTo(1 - jStat.poisson.cdf(6, 2), 12);
    expect(t.pLower).toBeCloseTo(jStat.poisson.cdf(6, 2), 12);
  });
});

describe('normal scores of counts', () => {
  it('have mean 0 and variance close to 1 under the expectation, even for skewed small means', () => {
    // Exact expectation by summing over the pmf (itself checked against jstat in test/unit/stats).
    for (const [mu, phi, lo] of [
      [50, 0, 0.98],
      [3, 0, 0.9],
      [20, 0.1, 0.95],
      [0.5, 0, 0.5],
    ] as const) {
      let m1 = 0;
      let m2 = 0;
      for (let k = 0; k < 2000; k++) {
        const p = phi === 0 ? poissonPmf(k, mu) : negBinomialPmf(k, mu, phi);
        const z = normalScore(k, mu, phi);
        m1 += p * z;
        m2 += p * z * z;
      }
      expect(Math.abs(m1)).toBeLessThan(0.06);
      expect(m2).toBeLessThanOrEqual(1.01);
      expect(m2).toBeGreaterThan(lo);
    }
  });

  it('are Φ⁻¹ of the mid-p value, as jstat computes it', () => {
    for (const [x, mu] of [
      [110, 100],
      [70, 100],
      [0, 2],
      [9, 2],
    ] as const) {
      const midP = (x > 0 ? jStat.poisson.cdf(x - 1, mu) : 0) + 0.5 * jStat.poisson.pdf(x, mu);
      // The score's normal quantile is an approximation good to 5e-4 (src/stats/special-functions.ts).
      expect(Math.abs(normalScore(x, mu, 0) - jStat.normal.inv(midP, 0, 1))).toBeLessThan(1e-3);
    }
  });
});
