import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import jStat from 'jstat';
import {
  logGamma,
  negBinomialCdf,
  negBinomialPmf,
  negBinomialQuantile,
  negBinomialSf,
  negBinomialVariance,
  poissonCdf,
  poissonPmf,
  poissonQuantile,
  poissonSf,
} from '../../../src/stats/count-distributions.ts';
import { isNearcastError } from '../../../src/errors.ts';

function relErr(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}

/**
 * Independent reference: the whole distribution by the ratio recurrence pmf(k+1)/pmf(k), started at 1 at the mode
 * and normalised by its own total — no log-gamma, no incomplete functions. Returns the normalised pmf over
 * [lo, hi], wide enough (±60 sd) that the omitted mass is far below double precision.
 */
function normalisedByRecurrence(mean: number, phi: number): { lo: number; pmf: Float64Array } {
  const r = phi === 0 ? Infinity : 1 / phi;
  const q = phi === 0 ? 0 : (phi * mean) / (1 + phi * mean);
  const ratio = (k: number): number => (phi === 0 ? mean / (k + 1) : ((k + r) / (k + 1)) * q);
  const sd = Math.sqrt(mean + phi * mean * mean);
  let mode = 0;
  if (phi === 0) mode = Math.floor(mean);
  else mode = Math.max(0, Math.floor(((r - 1) * q) / (1 - q)));
  const lo = Math.max(0, Math.floor(mode - 60 * sd - 60));
  const hi = Math.ceil(mode + 60 * sd + 200 * (1 + phi * sd));
  const w = new Float64Array(hi - lo + 1);
  w[mode - lo] = 1;
  for (let k = mode; k < hi; k++) w[k + 1 - lo] = w[k - lo]! * ratio(k);
  for (let k = mode; k > lo; k--) w[k - 1 - lo] = w[k - lo]! / ratio(k - 1);
  let total = 0;
  // Sum from the smallest terms up to keep rounding low.
  const sorted = Array.from(w).sort((a, b) => a - b);
  for (const v of sorted) total += v;
  for (let i = 0; i < w.length; i++) w[i] = w[i]! / total;
  return { lo, pmf: w };
}

function refCdf(ref: { lo: number; pmf: Float64Array }, k: number): number {
  let s = 0;
  for (let j = 0; j <= k - ref.lo && j < ref.pmf.length; j++) s += ref.pmf[j]!;
  return s;
}

function refSf(ref: { lo: number; pmf: Float64Array }, k: number): number {
  let s = 0;
  for (let j = ref.pmf.length - 1; j >= Math.max(0, k - ref.lo); j--) s += ref.pmf[j]!;
  return s;
}

describe('logGamma', () => {
  it('equals ln((n−1)!) summed term by term for integers up to 2000', () => {
    // Source: direct sum of ln k (exact definition of the factorial).
    let lnFact = 0;
    for (let n = 1; n <= 2000; n++) {
      if (n > 1) lnFact += Math.log(n - 1);
      if (n <= 2) expect(logGamma(n)).toBe(0);
      else expect(relErr(logGamma(n), lnFact)).toBeLessThan(2e-14);
    }
  });

  it('gives Γ(1/2) = √π and, by reflection, |Γ(−1/2)| = 2√π', () => {
    // Source: standard identities Γ(1/2) = √π and Γ(x)Γ(1−x) = π/sin(πx).
    expect(logGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 14);
    expect(logGamma(-0.5)).toBeCloseTo(Math.log(2 * Math.sqrt(Math.PI)), 14);
  });

  it('agrees with jstat.gammaln across 0.01..1e6 to jstat’s own accuracy', () => {
    // Source: jstat 1.9.6 gammaln (Lanczos, about 1e-10).
    for (const x of [0.01, 0.1, 0.7, 1.5, 3.3, 9.9, 15, 15.5, 77.7, 1234.5, 1e6]) {
      expect(Math.abs(logGamma(x) - jStat.gammaln(x))).toBeLessThan(2e-9 * Math.max(1, Math.abs(logGamma(x))));
    }
  });

  it('is infinite at the poles', () => {
    expect(logGamma(0)).toBe(Infinity);
    expect(logGamma(-3)).toBe(Infinity);
  });
});

describe('Poisson', () => {
  it('matches jstat’s summed Poisson cdf and pmf for means 0.01..100', () => {
    // Source: jstat 1.9.6 poisson.cdf / poisson.pdf (direct summation of λᵏe⁻λ/k!).
    for (const mu of [0.01, 0.2, 1, 2.5, 7, 20, 55, 100]) {
      for (const k of [0, 1, 2, 3, 5, 8, 13, 21, 40, 80, 120, 160]) {
        const ref = jStat.poisson.cdf(k, mu);
        // jstat's λᵏ/k! overflows to NaN beyond k ≈ 170; only finite reference values are compared.
        if (!Number.isFinite(ref) || ref < 1e-290) continue;
        expect(relErr(poissonCdf(k, mu), ref)).toBeLessThan(1e-12);
        const pref = jStat.poisson.pdf(k, mu);
        if (pref > 1e-290) expect(relErr(poissonPmf(k, mu), pref)).toBeLessThan(1e-12);
      }
    }
  });

  it('has P[X=0] = e^−μ and P[X≥1] = 1 − e^−μ to full precision at μ = 0.01', () => {
    // Source: hand formula; −expm1(−μ) gives 1 − e^−μ without cancellation.
    expect(relErr(poissonCdf(0, 0.01), Math.exp(-0.01))).toBeLessThan(1e-15);
    expect(relErr(poissonSf(1, 0.01), -Math.expm1(-0.01))).toBeLessThan(1e-13);
  });

  it('matches the normalised recurrence at means 1e4 and 1e6, in the centre and both far tails', () => {
    // Source: normalisedByRecurrence above (independent of log-gamma and incomplete-gamma code).
    for (const mu of [1e4, 1e6]) {
      const ref = normalisedByRecurrence(mu, 0);
      const sd = Math.sqrt(mu);
      for (const z of [-8, -3, -1, 0, 1, 3, 8]) {
        const k = Math.round(mu + z * sd);
        expect(relErr(poissonPmf(k, mu), ref.pmf[k - ref.lo]!)).toBeLessThan(1e-10);
        if (z <= 0) expect(relErr(poissonCdf(k, mu), refCdf(ref, k))).toBeLessThan(1e-10);
        else expect(relErr(poissonSf(k, mu), refSf(ref, k))).toBeLessThan(1e-10);
      }
    }
  });

  it('agrees with jstat’s incomplete gamma at mean 1e6', () => {
    // Source: jstat 1.9.6 lowRegGamma; P[X ≤ k] = 1 − P(k+1, μ). jstat's log-gamma limits it to ~1e-8 here.
    const mu = 1e6;
    for (const k of [999_000, 1_000_000, 1_001_500]) {
      expect(relErr(poissonCdf(k, mu), 1 - jStat.lowRegGamma(k + 1, mu))).toBeLessThan(1e-7);
    }
  });

  it('gives the hand-worked quantiles of Poisson(2)', () => {
    // Source: by hand, cdf(0..4) = e⁻²·(1, 3, 5, 19/3, 7) = 0.135, 0.406, 0.677, 0.857, 0.947.
    expect(poissonQuantile(0.1, 2)).toBe(0);
    expect(poissonQuantile(0.5, 2)).toBe(2);
    expect(poissonQuantile(0.85, 2)).toBe(3);
    expect(poissonQuantile(0.9, 2)).toBe(4);
    expect(poissonQuantile(0, 2)).toBe(0);
    expect(poissonQuantile(1, 2)).toBe(Infinity);
  });

  it('has cdf(k) + sf(k+1) = 1', () => {
    fc.assert(
      fc.property(fc.double({ min: -2, max: 6, noNaN: true }), fc.integer({ min: 0, max: 3_000_000 }), (lg, k) => {
        const mu = 10 ** lg;
        return Math.abs(poissonCdf(k, mu) + poissonSf(k + 1, mu) - 1) < 1e-13;
      }),
    );
  });

  it('is zero-mean degenerate at μ = 0', () => {
    expect(poissonPmf(0, 0)).toBe(1);
    expect(poissonCdf(0, 0)).toBe(1);
    expect(poissonSf(1, 0)).toBe(0);
    expect(poissonQuantile(0.9, 0)).toBe(0);
  });
});

describe('negative binomial', () => {
  it('matches jstat’s negbin pmf and summed cdf with r = 1/phi, p = r/(r+mean)', () => {
    // Source: jstat 1.9.6 negbin.pdf / negbin.cdf (C(k+r−1, r−1)(1−p)ᵏpʳ summed).
    for (const [mean, phi] of [[0.05, 0.5], [0.8, 0.3], [4, 0.1], [12, 1.5], [40, 0.02], [90, 0.005]] as const) {
      const r = 1 / phi;
      const p = r / (r + mean);
      for (const k of [0, 1, 2, 4, 9, 17, 33, 70, 140]) {
        const ref = jStat.negbin.cdf(k, r, p);
        if (!Number.isFinite(ref)) continue;
        // Tolerance 5e-10: beyond 170 jstat forms C(k+r−1, r−1) from its own log-gamma, good to about 1e-10.
        expect(relErr(negBinomialCdf(k, mean, phi), ref)).toBeLessThan(5e-10);
        expect(relErr(negBinomialPmf(k, mean, phi), jStat.negbin.pdf(k, r, p))).toBeLessThan(5e-10);
      }
    }
  });

  it('has mean and variance mean + phi·mean² (summed over the pmf)', () => {
    // Source: the parameterisation in INTERFACES.md, checked by summation over the support.
    for (const [mean, phi] of [[0.3, 2], [7, 0.25], [250, 0.04]] as const) {
      let m1 = 0;
      let m2 = 0;
      let total = 0;
      for (let k = 0; k < 20_000; k++) {
        const p = negBinomialPmf(k, mean, phi);
        total += p;
        m1 += k * p;
        m2 += k * k * p;
      }
      expect(total).toBeCloseTo(1, 12);
      expect(relErr(m1, mean)).toBeLessThan(1e-10);
      expect(relErr(m2 - m1 * m1, negBinomialVariance(mean, phi))).toBeLessThan(1e-9);
    }
  });

  it('matches the normalised recurrence in the centre and far tails at means up to 1e6', () => {
    // Source: normalisedByRecurrence above.
    for (const [mean, phi] of [[500, 0.05], [2e4, 0.01], [1e6, 1e-4]] as const) {
      const ref = normalisedByRecurrence(mean, phi);
      const sd = Math.sqrt(negBinomialVariance(mean, phi));
      for (const z of [-3, -1, 0, 1, 3, 10]) {
        const k = Math.max(0, Math.round(mean + z * sd));
        expect(relErr(negBinomialPmf(k, mean, phi), ref.pmf[k - ref.lo]!)).toBeLessThan(1e-9);
        if (z <= 0) expect(relErr(negBinomialCdf(k, mean, phi), refCdf(ref, k))).toBeLessThan(1e-9);
        else expect(relErr(negBinomialSf(k, mean, phi), refSf(ref, k))).toBeLessThan(1e-9);
      }
    }
  });

  it('agrees with jstat’s incomplete beta for a large overdispersed mean', () => {
    // Source: jstat 1.9.6 ibeta; P[X ≤ k] = I_p(r, k+1).
    const mean = 5e4;
    const phi = 0.2;
    const r = 1 / phi;
    const p = r / (r + mean);
    for (const k of [5_000, 40_000, 150_000]) {
      expect(relErr(negBinomialCdf(k, mean, phi), jStat.ibeta(p, r, k + 1))).toBeLessThan(1e-8);
    }
  });

  it('reduces to Poisson at phi = 0', () => {
    for (const mean of [0.01, 3, 300]) {
      for (const k of [0, 1, 2, 5, 290, 310]) expect(negBinomialCdf(k, mean, 0)).toBe(poissonCdf(k, mean));
    }
  });

  it('stays accurate in the near-Poisson range (phi·mean from 1e-13 to 1e-3)', () => {
    // Source: normalisedByRecurrence above. The documented worst case there is about 2.5e-8 relative (mean 1e6).
    for (const mean of [3, 300, 1e4]) {
      for (const pm of [1e-13, 1e-9, 1e-6, 5e-6, 1e-5, 1e-3]) {
        const phi = pm / mean;
        const ref = normalisedByRecurrence(mean, phi);
        const sd = Math.sqrt(negBinomialVariance(mean, phi));
        for (const z of [-6, -2, 0, 2, 6]) {
          const k = Math.max(0, Math.floor(mean + z * sd));
          expect(relErr(negBinomialCdf(k, mean, phi), refCdf(ref, k))).toBeLessThan(1e-8);
          expect(relErr(negBinomialSf(k + 1, mean, phi), refSf(ref, k + 1))).toBeLessThan(1e-8);
        }
      }
    }
  });

  it('keeps far upper tails that 1 − cdf would round to zero', () => {
    // Source: normalised recurrence; 1 − cdf underflows below 1e-16.
    const ref = normalisedByRecurrence(20, 0.1);
    expect(relErr(negBinomialSf(200, 20, 0.1), refSf(ref, 200))).toBeLessThan(1e-10);
    expect(negBinomialSf(200, 20, 0.1)).toBeLessThan(1e-16);
    expect(negBinomialSf(200, 20, 0.1)).toBeGreaterThan(0);
  });

  it('returns the smallest k whose cdf reaches p, for means 0.01..1e6 and phi 0..2', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 1e-9, max: 1 - 1e-9, noNaN: true }),
        fc.double({ min: -2, max: 6, noNaN: true }),
        fc.oneof(fc.constant(0), fc.double({ min: 1e-6, max: 2, noNaN: true })),
        (p, lg, phi) => {
          const mean = 10 ** lg;
          const k = negBinomialQuantile(p, mean, phi);
          const slack = 1e-12;
          return negBinomialCdf(k, mean, phi) >= p - slack && (k === 0 || negBinomialCdf(k - 1, mean, phi) < p + slack);
        },
      ),
      { numRuns: 300 },
    );
  });

  it('has a cdf that never decreases in k', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 5000 }),
        fc.double({ min: 0.01, max: 2000, noNaN: true }),
        fc.double({ min: 0, max: 3, noNaN: true }),
        (k, mean, phi) => negBinomialCdf(k + 1, mean, phi) >= negBinomialCdf(k, mean, phi) - 1e-15,
      ),
    );
  });

  it('rejects a negative mean or dispersion with an error naming the argument', () => {
    const code = 'NEARCAST_STATS_ARGUMENT_INVALID';
    expect(() => negBinomialCdf(1, -1, 0.1)).toThrow(/mean/);
    expect(() => negBinomialPmf(1, 2, -0.1)).toThrow(/phi/);
    expect(() => poissonQuantile(1.5, 2)).toThrow(/p must be a probability/);
    try {
      poissonCdf(1, Number.NaN);
    } catch (e) {
      expect(isNearcastError(e, code)).toBe(true);
    }
  });
});
