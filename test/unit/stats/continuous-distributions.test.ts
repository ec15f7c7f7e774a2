import { describe, expect, it } from 'vitest';
import jStat from 'jstat';
import {
  normalCdf,
  normalQuantile,
  normalQuantileUpper,
  normalSf,
  studentTCdf,
  studentTSf,
} from '../../../src/stats/continuous-distributions.ts';
import { binomialSf } from '../../../src/stats/count-distributions.ts';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

describe('normal and Student-t tails', () => {
  it('match jstat’s normal cdf', () => {
    // Source: jstat 1.9.6 normal.cdf (erf series, about 1e-14 absolute).
    for (const x of [-6, -3, -1.96, -0.5, 0, 0.3, 1.645, 2.5, 5]) {
      expect(Math.abs(normalCdf(x) - jStat.normal.cdf(x, 0, 1))).toBeLessThan(1e-13);
    }
  });

  it('keep the far normal tail: P[Z > 10] ≈ 7.62e-24', () => {
    // Source: standard table value Q(10) = 7.6198530241605e-24 (recalled from memory); 1 − cdf would give 0.
    expect(rel(normalSf(10), 7.6198530241605e-24)).toBeLessThan(1e-10);
  });

  it('match the closed forms of Student-t for 1 and 2 degrees of freedom', () => {
    // Source: by hand — ν = 1 (Cauchy): P[T > t] = ½ − atan(t)/π; ν = 2: P[T > t] = ½ − t / (2√(2 + t²)).
    for (const t of [-4, -0.7, 0.4, 1.8, 3.3, 25]) {
      expect(Math.abs(studentTSf(t, 1) - (0.5 - Math.atan(t) / Math.PI))).toBeLessThan(1e-15);
      expect(Math.abs(studentTSf(t, 2) - (0.5 - t / (2 * Math.sqrt(2 + t * t))))).toBeLessThan(1e-15);
    }
  });

  it('match jstat’s Student-t cdf for fractional and large degrees of freedom', () => {
    // Source: jstat 1.9.6 studentt.cdf; it is good to about 1e-8 (its incomplete beta), hence the tolerance.
    for (const dof of [4.5, 5, 12, 30, 200]) {
      for (const t of [-4, -2, -0.7, 0, 0.4, 1.8, 3.3]) {
        expect(Math.abs(studentTCdf(t, dof) - jStat.studentt.cdf(t, dof))).toBeLessThan(5e-8);
      }
    }
  });

  it('give the textbook critical value: P[T₅ > 2.015] ≈ 0.05', () => {
    // Source: jstat 1.9.6 studentt.inv(0.95, 5) = 2.015048…, and every t table's 2.015 (one-sided 5%, 5 dof).
    expect(studentTSf(jStat.studentt.inv(0.95, 5), 5)).toBeCloseTo(0.05, 7);
    // Cauchy (1 dof) by hand: P[T > 1] = 1/4.
    expect(studentTSf(1, 1)).toBeCloseTo(0.25, 14);
  });
});

describe('binomial upper tail', () => {
  it('matches exact enumeration Σ C(n, j)/2ⁿ and jstat’s binomial cdf', () => {
    // Source: enumeration of binomial coefficients (exact in doubles for n ≤ 40); jstat 1.9.6 binomial.cdf,
    // which rounds its result to 10 decimals, hence its looser tolerance.
    for (const n of [1, 6, 13, 40]) {
      for (let k = 0; k <= n; k++) {
        let exact = 0;
        let c = 1;
        for (let j = 0; j <= n; j++) {
          if (j >= k) exact += c;
          c = (c * (n - j)) / (j + 1);
        }
        exact /= 2 ** n;
        expect(Math.abs(binomialSf(k, n, 0.5) - exact)).toBeLessThanOrEqual(1e-13 * exact);
        const ref = k === 0 ? 1 : 1 - jStat.binomial.cdf(k - 1, n, 0.5);
        expect(Math.abs(binomialSf(k, n, 0.5) - ref)).toBeLessThan(1e-9);
      }
    }
  });

  it('gives the hand-worked sign-test tail P[X ≥ 6 | n = 6] = 1/64', () => {
    expect(binomialSf(6, 6, 0.5)).toBeCloseTo(1 / 64, 15);
    expect(binomialSf(5, 6, 0.5)).toBeCloseTo(7 / 64, 15);
  });
});

describe('normal quantile', () => {
  it('inverts the normal cdf to near full precision, including far tails', () => {
    // Source: jstat 1.9.6 normal.inv for the body (good to about 1e-9 there); the round trip for the tails.
    for (const p of [1e-300, 1e-20, 1e-8, 0.001, 0.025, 0.1, 0.3, 0.5, 0.7, 0.9, 0.975, 0.999]) {
      const z = normalQuantile(p);
      // Rounding z itself moves Φ by a relative |z|·ulp(z) ≈ z²·1e-16, the floor for any quantile.
      expect(rel(normalCdf(z), p)).toBeLessThan(1e-14 * (1 + z * z));
      if (p > 1e-8) expect(Math.abs(z - jStat.normal.inv(p, 0, 1))).toBeLessThan(1e-8);
    }
    expect(normalQuantile(0.975)).toBeCloseTo(1.959963984540054, 13); // every z-table's 1.96 (recalled from memory)
  });

  it('keeps tiny upper tails: P[Z > z] = 1e-20', () => {
    expect(rel(normalSf(normalQuantileUpper(1e-20)), 1e-20)).toBeLessThan(1e-12);
  });
});
