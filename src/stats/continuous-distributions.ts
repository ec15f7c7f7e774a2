// Normal and Student-t tails for significance tests, through the regularized incomplete gamma and beta
// functions (so small tail probabilities keep their relative precision).

import { NearcastError } from '../errors.ts';
import { approxNormalQuantile, regularizedBeta, regularizedGamma } from './special-functions.ts';

function argError(detail: string): never {
  throw new NearcastError('NEARCAST_STATS_ARGUMENT_INVALID', [detail]);
}

/** P[Z ≤ x] for a standard normal: ½·erfc(−x/√2), with erfc(z) = Q(½, z²). */
export function normalCdf(x: number): number {
  if (Number.isNaN(x)) argError('x must be a number');
  if (x === 0) return 0.5;
  const q = regularizedGamma(0.5, (x * x) / 2);
  return x < 0 ? 0.5 * q.upper : 0.5 + 0.5 * q.lower;
}

/** P[Z > x] for a standard normal. */
export function normalSf(x: number): number {
  return normalCdf(-x);
}

/** P[T > t] for Student's t with `dof` > 0 degrees of freedom: ½·I_{ν/(ν+t²)}(ν/2, ½) for t ≥ 0. */
export function studentTSf(t: number, dof: number): number {
  if (Number.isNaN(t)) argError('t must be a number');
  if (!(dof > 0) || !Number.isFinite(dof)) argError(`dof must be a finite number > 0 (got ${String(dof)})`);
  if (t === 0) return 0.5;
  if (t === Infinity) return 0;
  if (t === -Infinity) return 1;
  const t2 = t * t;
  const x = dof / (dof + t2);
  const y = t2 / (dof + t2);
  const tail = 0.5 * regularizedBeta(x, y, dof / 2, 0.5).lower;
  return t > 0 ? tail : 1 - tail;
}

/** P[T ≤ t] for Student's t. */
export function studentTCdf(t: number, dof: number): number {
  return studentTSf(-t, dof);
}

/**
 * Standard normal quantile Φ⁻¹(p), to about 1e-15 relative: a rational starting value refined by Halley steps on
 * normalCdf (or on the upper tail for p > ½, so 1 − p keeps its digits when the caller passes the tail directly
 * via `normalQuantileUpper`).
 */
export function normalQuantile(p: number): number {
  if (!(p >= 0 && p <= 1)) argError(`p must be a probability in [0, 1] (got ${String(p)})`);
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  if (p > 0.5) return -lowerTailQuantile(1 - p);
  return lowerTailQuantile(p);
}

/** z with P[Z > z] = q, accurate for tiny q (where 1 − q would round). */
export function normalQuantileUpper(q: number): number {
  if (!(q >= 0 && q <= 1)) argError(`q must be a probability in [0, 1] (got ${String(q)})`);
  if (q === 0) return Infinity;
  if (q === 1) return -Infinity;
  if (q > 0.5) return lowerTailQuantile(1 - q);
  return -lowerTailQuantile(q);
}

// z ≤ 0 with Φ(z) = p, for 0 < p ≤ ½.
function lowerTailQuantile(p: number): number {
  let z = approxNormalQuantile(p);
  for (let i = 0; i < 6; i++) {
    const f = normalCdf(z) - p;
    const pdf = Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);
    if (!(pdf > 0)) break;
    // Halley: Newton step corrected by the curvature φ'(z)/φ(z) = −z.
    const t = f / pdf;
    const step = t / (1 + 0.5 * z * t);
    z -= step;
    if (Math.abs(step) <= 1e-15 * Math.max(1, Math.abs(z))) break;
  }
  return z;
}
