// Robust summaries used before fitting: weighted means and quantiles, median and MAD, and winsorising.
//
// Quantile definition: Hazen's (Hyndman & Fan type 5) generalised to weights — each sorted value sits at the
// centre of its weight, (Sᵢ − wᵢ/2)/W with Sᵢ the cumulative weight, and the quantile interpolates linearly
// between those points, clamped to the extremes outside them. With equal weights this is the textbook type 5
// (so the median of an even sample is the average of the middle two), and a weight of 2 acts like a repeated value
// only approximately (as with every interpolating definition).

import { NearcastError } from '../errors.ts';
import { ascendingOrder } from './ascending-order.ts';

/** 1/Φ⁻¹(3/4): makes the MAD a consistent estimate of σ for normal data (Φ⁻¹(0.75) = 0.6744897501960817). */
export const MAD_TO_SIGMA = 1 / 0.6744897501960817;

/** √(π/2): makes the mean absolute deviation a consistent σ estimate for normal data. */
const MEAN_AD_TO_SIGMA = Math.sqrt(Math.PI / 2);

function argError(detail: string): never {
  throw new NearcastError('NEARCAST_STATS_ARGUMENT_INVALID', [detail]);
}

function check(values: ArrayLike<number>, weights?: ArrayLike<number>): void {
  for (let i = 0; i < values.length; i++) {
    if (!Number.isFinite(values[i]!)) argError(`values[${i}] must be finite (got ${String(values[i])})`);
  }
  if (weights === undefined) return;
  if (weights.length !== values.length) argError(`weights has ${weights.length} entries for ${values.length} values`);
  for (let i = 0; i < weights.length; i++) {
    const w = weights[i]!;
    if (!(w >= 0) || !Number.isFinite(w)) argError(`weights[${i}] must be finite and ≥ 0 (got ${String(w)})`);
  }
}

function checkP(p: number, field = 'p'): void {
  if (!(p >= 0 && p <= 1)) argError(`${field} must be a probability in [0, 1] (got ${String(p)})`);
}

/** Σwx / Σw (plain mean without weights); NaN when there is no positive weight. */
export function weightedMean(values: ArrayLike<number>, weights?: ArrayLike<number>): number {
  check(values, weights);
  let sw = 0;
  let s = 0;
  for (let i = 0; i < values.length; i++) {
    const w = weights === undefined ? 1 : weights[i]!;
    sw += w;
    s += w * values[i]!;
  }
  if (!(sw > 0)) return NaN;
  // Second pass corrects the rounding of the first.
  let mean = s / sw;
  let c = 0;
  for (let i = 0; i < values.length; i++) c += (weights === undefined ? 1 : weights[i]!) * (values[i]! - mean);
  mean += c / sw;
  return mean;
}

interface Sorted {
  readonly x: Float64Array;
  /** Plotting position (centre of each value's weight) in [0, 1]. */
  readonly pos: Float64Array;
}

/**
 * Values equal up to rounding (relative 1e-12) are one tie group. Within a group the weight is shared equally, so
 * the result does not depend on the order tied values arrive in, nor jump when rounding (the same ratio computed
 * from quantities scaled by a constant) splits a tie the other way: a member's position depends on its own weight,
 * and two near-equal values of different weight swapping places would otherwise move the curve. With equal
 * weights this changes nothing.
 */
const TIE_TOLERANCE = 1e-12;

function sortWeighted(values: ArrayLike<number>, weights?: ArrayLike<number>): Sorted | null {
  let kept = 0;
  const candidates = new Int32Array(values.length);
  for (let i = 0; i < values.length; i++) if (weights === undefined || weights[i]! > 0) candidates[kept++] = i;
  if (kept === 0) return null;
  // By value, ties (including −0 and +0) by index.
  const idx = ascendingOrder(values, candidates.subarray(0, kept));
  const n = idx.length;
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  let total = 0;
  for (let r = 0; r < n; r++) {
    x[r] = values[idx[r]!]!;
    w[r] = weights === undefined ? 1 : weights[idx[r]!]!;
    total += w[r]!;
  }
  if (weights !== undefined) {
    for (let start = 0; start < n; ) {
      let end = start + 1;
      const tol = TIE_TOLERANCE * Math.abs(x[start]!);
      while (end < n && x[end]! - x[start]! <= tol) end++;
      if (end - start > 1) {
        let sum = 0;
        for (let r = start; r < end; r++) sum += w[r]!;
        for (let r = start; r < end; r++) w[r] = sum / (end - start);
      }
      start = end;
    }
  }
  const pos = new Float64Array(n);
  let cum = 0;
  for (let r = 0; r < n; r++) {
    pos[r] = (cum + w[r]! / 2) / total;
    cum += w[r]!;
  }
  return { x, pos };
}

function quantileOfSorted(s: Sorted, p: number): number {
  const { x, pos } = s;
  const n = x.length;
  if (p <= pos[0]!) return x[0]!;
  if (p >= pos[n - 1]!) return x[n - 1]!;
  // Binary search for the last position ≤ p.
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (pos[mid]! <= p) lo = mid;
    else hi = mid;
  }
  const t = (p - pos[lo]!) / (pos[hi]! - pos[lo]!);
  return x[lo]! + t * (x[hi]! - x[lo]!);
}

/** Weighted quantile (type 5, see the file header); NaN when there is no positive weight. */
export function weightedQuantile(values: ArrayLike<number>, weights: ArrayLike<number> | undefined, p: number): number {
  check(values, weights);
  checkP(p);
  const s = sortWeighted(values, weights);
  return s === null ? NaN : quantileOfSorted(s, p);
}

/** Several weighted quantiles with one sort. */
export function weightedQuantiles(
  values: ArrayLike<number>,
  weights: ArrayLike<number> | undefined,
  ps: readonly number[],
): number[] {
  check(values, weights);
  ps.forEach((p, i) => checkP(p, `ps[${i}]`));
  const s = sortWeighted(values, weights);
  return ps.map((p) => (s === null ? NaN : quantileOfSorted(s, p)));
}

/** Unweighted quantile (type 5). */
export function quantile(values: ArrayLike<number>, p: number): number {
  return weightedQuantile(values, undefined, p);
}

/** Median (average of the middle two for an even count); NaN for no values. */
export function median(values: ArrayLike<number>, weights?: ArrayLike<number>): number {
  return weightedQuantile(values, weights, 0.5);
}

/** Median absolute deviation from the median (raw, not scaled to σ; multiply by MAD_TO_SIGMA for that). */
export function mad(values: ArrayLike<number>, weights?: ArrayLike<number>): number {
  const m = median(values, weights);
  if (Number.isNaN(m)) return NaN;
  const dev = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) dev[i] = Math.abs(values[i]! - m);
  return median(dev, weights);
}

/**
 * A robust σ: MAD × 1.4826; when more than half the values are identical (MAD = 0) it falls back to the mean
 * absolute deviation × √(π/2) (common practice, Iglewicz & Hoaglin's modified z-score, recalled from memory).
 */
export function robustSigma(values: ArrayLike<number>, weights?: ArrayLike<number>): number {
  const m = median(values, weights);
  if (Number.isNaN(m)) return NaN;
  const raw = mad(values, weights);
  if (raw > 0) return raw * MAD_TO_SIGMA;
  const dev = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) dev[i] = Math.abs(values[i]! - m);
  return weightedMean(dev, weights) * MEAN_AD_TO_SIGMA;
}

export interface Winsorised {
  /** A copy of the input with values outside [lower, upper] moved to the nearer limit. */
  readonly values: Float64Array;
  readonly lower: number;
  readonly upper: number;
  /** How many values were moved. */
  readonly clipped: number;
}

function clampAll(values: ArrayLike<number>, lower: number, upper: number): Winsorised {
  const out = new Float64Array(values.length);
  let clipped = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    const c = v < lower ? lower : v > upper ? upper : v;
    if (c !== v) clipped++;
    out[i] = c;
  }
  return { values: out, lower, upper, clipped };
}

/** Winsorises at the (weighted) `lowerP` and `upperP` quantiles, e.g. 0.05 and 0.95. */
export function winsoriseByQuantiles(
  values: ArrayLike<number>,
  options: { lowerP: number; upperP: number; weights?: ArrayLike<number> },
): Winsorised {
  const { lowerP, upperP, weights } = options;
  checkP(lowerP, 'lowerP');
  checkP(upperP, 'upperP');
  if (lowerP > upperP) argError(`lowerP (${lowerP}) must not exceed upperP (${upperP})`);
  const [lower, upper] = weightedQuantiles(values, weights, [lowerP, upperP]);
  if (Number.isNaN(lower!)) return { values: Float64Array.from(values), lower: NaN, upper: NaN, clipped: 0 };
  return clampAll(values, lower!, upper!);
}

/**
 * Winsorises at median ± z·robustSigma (a robust z-score limit, e.g. z = 3.5). With no spread at all nothing
 * is moved.
 */
export function winsoriseByRobustZ(values: ArrayLike<number>, z: number, weights?: ArrayLike<number>): Winsorised {
  if (!(z > 0) || !Number.isFinite(z)) argError(`z must be a finite number > 0 (got ${String(z)})`);
  const m = median(values, weights);
  const s = robustSigma(values, weights);
  if (Number.isNaN(m) || !(s > 0)) {
    check(values, weights);
    return { values: Float64Array.from(values), lower: -Infinity, upper: Infinity, clipped: 0 };
  }
  return clampAll(values, m - z * s, m + z * s);
}
