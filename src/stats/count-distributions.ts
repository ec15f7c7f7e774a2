// Poisson and negative-binomial probabilities for count demand, stable from means of 0.01 to 1e6.
// Parameterisation: Var = mean + phi·mean²; phi = 0 is Poisson; size r = 1/phi, success prob p = r/(r+mean).
// Tails go through the regularized incomplete gamma/beta functions (cost grows like √mean, never like mean);
// quantiles start from a Cornish–Fisher guess and walk a few terms with the pmf recurrence.

import { NearcastError } from '../errors.ts';
import {
  approxNormalQuantile,
  binomialDensityRaw,
  logGamma as logGammaImpl,
  poissonDensityRaw,
  regularizedBeta,
  regularizedBetaSide,
  regularizedGammaSide,
} from './special-functions.ts';

/** ln|Γ(x)|. */
export const logGamma = logGammaImpl;

function invalid(field: string, reason: string, value: number): never {
  throw new NearcastError('NEARCAST_STATS_ARGUMENT_INVALID', [`${field} ${reason} (got ${String(value)})`]);
}

function checkMean(name: string, m: number): void {
  if (!Number.isFinite(m) || m < 0) invalid(name, 'must be a finite number ≥ 0', m);
}

function checkPhi(phi: number): void {
  if (!Number.isFinite(phi) || phi < 0) invalid('phi', 'must be a finite number ≥ 0', phi);
}

function checkK(k: number): void {
  if (Number.isNaN(k)) invalid('k', 'must be a number', k);
}

function checkP(p: number): void {
  if (!(p >= 0 && p <= 1)) invalid('p', 'must be a probability in [0, 1]', p);
}

// ---------------------------------------------------------------------------------------------- Poisson

/** P[X = k] for X ~ Poisson(mu); 0 for non-integer or negative k. */
export function poissonPmf(k: number, mu: number): number {
  checkK(k);
  checkMean('mu', mu);
  if (k < 0 || !Number.isInteger(k)) return 0;
  return poissonDensityRaw(k, mu);
}

/** P[X ≤ k] for X ~ Poisson(mu). */
export function poissonCdf(k: number, mu: number): number {
  checkK(k);
  checkMean('mu', mu);
  if (k < 0) return 0;
  if (k === Infinity) return 1;
  const kk = Math.floor(k);
  if (mu === 0) return 1;
  return regularizedGammaSide(kk + 1, mu, true);
}

/** P[X ≥ k] for X ~ Poisson(mu), computed directly (not as 1 − cdf) so tiny upper tails keep their digits. */
export function poissonSf(k: number, mu: number): number {
  checkK(k);
  checkMean('mu', mu);
  if (k <= 0) return 1;
  if (k === Infinity) return 0;
  const kk = Math.ceil(k);
  if (mu === 0) return 0;
  return regularizedGammaSide(kk, mu, false);
}

/** Smallest integer k with P[X ≤ k] ≥ p, X ~ Poisson(mu); Infinity for p = 1 when mu > 0. */
export function poissonQuantile(p: number, mu: number): number {
  checkP(p);
  checkMean('mu', mu);
  return discreteQuantile(p, mu, 0);
}

// ------------------------------------------------------------------------------------- negative binomial

/** P[X = k] for a negative binomial with the given mean and dispersion phi (Var = mean + phi·mean²). */
export function negBinomialPmf(k: number, mean: number, phi: number): number {
  checkK(k);
  checkMean('mean', mean);
  checkPhi(phi);
  if (k < 0 || !Number.isInteger(k)) return 0;
  return nbPmf(k, mean, phi);
}

/**
 * Below this phi·mean the negative binomial equals the Poisson to about 1e-13 relative within ±10 sd, while
 * r = 1/phi is so large that r − n·p (in the saddle-point deviance) would carry rounding from r's last digit.
 */
const POISSON_LIMIT = 1e-14;

function isPoissonLimit(mean: number, phi: number): boolean {
  return phi === 0 || mean === 0 || phi * mean < POISSON_LIMIT || !Number.isFinite(1 / phi);
}

function nbPmf(k: number, mean: number, phi: number): number {
  if (isPoissonLimit(mean, phi)) return poissonDensityRaw(k, mean);
  const r = 1 / phi;
  if (k === 0) return Math.exp(-r * Math.log1p(mean * phi));
  // Γ(k+r)/(Γ(r)k!)·pʳqᵏ = r/(k+r) · C(k+r, r)·pʳqᵏ, with p = r/(r+mean) and q = mean/(r+mean) = phi·mean/(1+phi·mean).
  const p = 1 / (1 + phi * mean);
  const q = (phi * mean) / (1 + phi * mean);
  return (r / (k + r)) * binomialDensityRaw(r, k, p, q);
}

/** P[X ≤ k] for the negative binomial (mean, phi). */
export function negBinomialCdf(k: number, mean: number, phi: number): number {
  checkK(k);
  checkMean('mean', mean);
  checkPhi(phi);
  if (k < 0) return 0;
  if (k === Infinity) return 1;
  if (isPoissonLimit(mean, phi)) return poissonCdf(k, mean);
  return nbTail(Math.floor(k), mean, phi, false);
}

/** P[X ≥ k] for the negative binomial (mean, phi), computed directly in the upper tail. */
export function negBinomialSf(k: number, mean: number, phi: number): number {
  checkK(k);
  checkMean('mean', mean);
  checkPhi(phi);
  if (k <= 0) return 1;
  if (k === Infinity) return 0;
  if (isPoissonLimit(mean, phi)) return poissonSf(k, mean);
  return nbTail(Math.ceil(k) - 1, mean, phi, true);
}

/** Smallest integer k with P[X ≤ k] ≥ p for the negative binomial (mean, phi). */
export function negBinomialQuantile(p: number, mean: number, phi: number): number {
  checkP(p);
  checkMean('mean', mean);
  checkPhi(phi);
  return discreteQuantile(p, mean, isPoissonLimit(mean, phi) ? 0 : phi);
}

/**
 * Below this phi·mean (for means ≥ 1) the incomplete-beta continued fraction works at p = 1/(1+phi·mean) so close
 * to 1 that its coefficients cancel (relative error about 1e-16·mean/(phi·mean) — 1e-4 at phi·mean = 1e-12), while
 * the near-Poisson approximation below is accurate to about (phi·mean)²·mean^½ (measured against exact summation;
 * worst case about 2e-8 relative at a mean of 1e6 and phi·mean ≈ 5e-6, 1e-12 or better in typical ranges).
 */
const NEAR_POISSON = 5e-6;

/** P[X ≤ k] (lower) and P[X > k] (upper) for integer k ≥ 0. */
function nbTail(k: number, mean: number, phi: number, upper: boolean): number {
  const pm = phi * mean;
  const r = 1 / phi;
  if (pm < NEAR_POISSON && mean >= 1) {
    // I_p(r, k+1) → Q(k+1, t) as r → ∞ with t = (r + k/2)·ln(1 + phi·mean): a Poisson at a mean shifted by
    // phi·mean·(k − mean)/2, which matches the gamma–Poisson mixture to first order in phi (the leading term of
    // the large-a expansion of the incomplete beta). Q(k+1, t) is P[X ≤ k]; P(k+1, t) is P[X > k].
    const t = (r + k / 2) * Math.log1p(pm);
    return regularizedGammaSide(k + 1, t, !upper);
  }
  return regularizedBetaSide(1 / (1 + pm), pm / (1 + pm), r, k + 1, upper);
}

// -------------------------------------------------------------------------------------------- quantiles

function cdfOf(k: number, mean: number, phi: number): number {
  if (phi === 0) return regularizedGammaSide(k + 1, mean, true);
  return nbTail(k, mean, phi, false);
}

/** P[X > k] = P[X ≥ k+1]. */
function sfAbove(k: number, mean: number, phi: number): number {
  if (phi === 0) return regularizedGammaSide(k + 1, mean, false);
  return nbTail(k, mean, phi, true);
}

// pmf(k+1)/pmf(k)
function upRatio(k: number, mean: number, phi: number): number {
  if (phi === 0) return mean / (k + 1);
  const r = 1 / phi;
  return ((k + r) / (k + 1)) * ((phi * mean) / (1 + phi * mean));
}

/** Walk at most this many terms from the first guess before switching to bracketing and bisection. */
const MAX_WALK = 24;

function discreteQuantile(p: number, mean: number, phi: number): number {
  if (p === 0 || mean === 0) return 0;
  if (p === 1) return Infinity;
  const variance = mean + phi * mean * mean;
  const sd = Math.sqrt(variance);
  // Third cumulant of the NB (Poisson at phi = 0): mean(1 + phi·mean)(1 + 2·phi·mean).
  const skew = (mean * (1 + phi * mean) * (1 + 2 * phi * mean)) / (variance * sd);
  const z = approxNormalQuantile(p);
  const guess = mean + sd * (z + (skew * (z * z - 1)) / 6);
  let k = Math.max(0, Math.round(guess - 0.5));
  if (!Number.isFinite(k) || k > 1e15) k = Math.round(mean);

  // reached(k) ⇔ cdf(k) ≥ p; below the median through the cdf, above it through P[X > k] ≤ 1 − p, so either
  // tail keeps its relative precision. Plain functions rather than closures: this runs for every series, lead and
  // quantile level of a recompute.
  const lower = p <= 0.5;
  const target = lower ? p : 1 - p;

  // Near the guess: walk with the pmf recurrence (one multiply per term).
  let pmf = nbPmf(k, mean, phi);
  let t = tailAt(lower, k, mean, phi);
  if (isReached(lower, t, target)) {
    for (let step = 0; step < MAX_WALK; step++) {
      if (k === 0) return 0;
      const before = lower ? t - pmf : t + pmf; // tail value at k − 1
      if (!isReached(lower, before, target)) return k;
      t = before;
      pmf = nbPmf(k - 1, mean, phi);
      k--;
    }
    return bisect(k - 1, k, lower, target, mean, phi);
  }
  for (let step = 0; step < MAX_WALK; step++) {
    pmf *= upRatio(k, mean, phi);
    k++;
    t = lower ? t + pmf : t - pmf;
    if (pmf === 0 || t < 0) t = tailAt(lower, k, mean, phi);
    if (isReached(lower, t, target)) return k;
  }
  return bisect(k, k + 1, lower, target, mean, phi);
}

/** The tail the quantile search works in: P[X ≤ j] below the median, P[X > j] above it. */
function tailAt(lower: boolean, j: number, mean: number, phi: number): number {
  return lower ? cdfOf(j, mean, phi) : sfAbove(j, mean, phi);
}

function isReached(lower: boolean, t: number, target: number): boolean {
  return lower ? t >= target : t <= target;
}

function reachedAt(k: number, lower: boolean, target: number, mean: number, phi: number): boolean {
  return isReached(lower, tailAt(lower, k, mean, phi), target);
}

/**
 * Smallest k ≥ 0 with the tail reached, starting from the pair (lo, hi): the bracket is widened by doubling steps
 * until lo is unreached (or −1) and hi reached, then bisected — O(log range) tail evaluations, for skewed
 * distributions where the Cornish–Fisher guess is far off.
 */
function bisect(lo: number, hi: number, lower: boolean, target: number, mean: number, phi: number): number {
  // Establish lo unreached (or −1) and hi reached.
  let step = 1;
  while (lo >= 0 && reachedAt(lo, lower, target, mean, phi)) {
    hi = lo;
    lo = Math.max(-1, lo - step);
    step *= 2;
  }
  step = 1;
  while (!reachedAt(hi, lower, target, mean, phi)) {
    lo = hi;
    hi += step;
    step *= 2;
  }
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (mid >= 0 && reachedAt(mid, lower, target, mean, phi)) hi = mid;
    else lo = mid;
  }
  return hi;
}

// ------------------------------------------------------------------------------------------- binomial

/** P[X ≥ k] for X ~ Binomial(n, p), = I_p(k, n − k + 1) (exact; used by sign tests). */
export function binomialSf(k: number, n: number, p: number): number {
  checkK(k);
  if (!Number.isInteger(n) || n < 0) invalid('n', 'must be an integer ≥ 0', n);
  checkP(p);
  if (k <= 0) return 1;
  const kk = Math.ceil(k);
  if (kk > n) return 0;
  if (p === 0) return 0;
  if (p === 1) return 1;
  return regularizedBeta(p, 1 - p, kk, n - kk + 1).lower;
}

// ------------------------------------------------------------------------------------------ moments

/** Variance of the negative binomial (mean, phi): mean + phi·mean². */
export function negBinomialVariance(mean: number, phi: number): number {
  checkMean('mean', mean);
  checkPhi(phi);
  return mean + phi * mean * mean;
}
