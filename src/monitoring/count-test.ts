import { negBinomialCdf, negBinomialPmf, negBinomialQuantile, negBinomialSf } from '../stats/count-distributions.ts';
import { approxNormalQuantile } from '../stats/special-functions.ts';

// Exact count-data tests of one day's intake against its expectation under Var = μ + φμ² (Poisson at φ = 0).
// A normal 3σ band on a mean of 2 is wrong in both tails, so limits and p-values come from the negative binomial
// itself. Items sold in case packs are counted in cases (Var of units = c·μ + φμ², the same φ).

export interface CountTest {
  /** Limits of the in-control band in units: observations outside [lower, upper] are beyond the limits. */
  readonly lower: number;
  readonly upper: number;
  /** P[X ≥ x] and P[X ≤ x] under the expectation. */
  readonly pUpper: number;
  readonly pLower: number;
  /** min(1, 2·min(pUpper, pLower)): the two-sided tail probability. */
  readonly pTwoSided: number;
}

function counts(observed: number, mean: number, casePack: number): { k: number; m: number } {
  const c = casePack > 0 ? casePack : 1;
  return { k: observed / c, m: mean / c };
}

export function countTest(observed: number, mean: number, phi: number, alpha: number, casePack = 1): CountTest {
  const c = casePack > 0 ? casePack : 1;
  const { k, m } = counts(observed, mean, c);
  // Fractional quantities (kilograms, part cases) are tested at the nearest whole count on each side.
  const pUpper = negBinomialSf(Math.ceil(k - 1e-9), m, phi);
  const pLower = negBinomialCdf(Math.floor(k + 1e-9), m, phi);
  return {
    lower: negBinomialQuantile(alpha / 2, m, phi) * c,
    upper: negBinomialQuantile(1 - alpha / 2, m, phi) * c,
    pUpper,
    pLower,
    pTwoSided: Math.min(1, 2 * Math.min(pUpper, pLower)),
  };
}

/**
 * The normal score of a count: Φ⁻¹ of its mid-p value P[X < x] + ½P[X = x]. Under the expectation it is close to
 * N(0, 1) at any mean (exactly symmetric, slightly less variable for tiny means), so a CUSUM on scores keeps its
 * designed false-alarm rate where a CUSUM on (x − μ)/σ of a skewed small count would not. The quantile
 * approximation's error (below 5e-4 in z) is far below the noise of one day.
 */
export function normalScore(observed: number, mean: number, phi: number, casePack = 1): number {
  const { k: raw, m } = counts(observed, mean, casePack);
  const k = Math.max(0, Math.round(raw));
  if (m <= 0) return k > 0 ? MAX_SCORE : 0;
  const half = 0.5 * negBinomialPmf(k, m, phi);
  const below = k > 0 ? negBinomialCdf(k - 1, m, phi) + half : half;
  const z = below <= 0.5 ? approxNormalQuantile(below) : -approxNormalQuantile(negBinomialSf(k + 1, m, phi) + half);
  return Math.max(-MAX_SCORE, Math.min(MAX_SCORE, z));
}

// Far tails only ever mean "very far": beyond this the score adds nothing but the risk of one day owning a CUSUM.
const MAX_SCORE = 8;
