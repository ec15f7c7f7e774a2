// Method-of-moments dispersion for the count model Var = μ + φ·μ²: each observation y with expected mean μ
// contributes (y − μ)² − μ, whose expectation is φ·μ²; φ̂ = Σw[(y − μ)² − μ] / Σw·μ², clipped at 0 (a sample
// less variable than Poisson is read as Poisson, not as a negative variance). The sums are kept as an
// accumulator so dispersion can be pooled across the series of a volume band and merged across days.

import { NearcastError } from '../errors.ts';
import { VOLUME_BANDS, volumeBandOf, type VolumeBand } from './volume-band.ts';

/** Running sums behind a dispersion estimate; plain JSON. */
export interface DispersionAccumulator {
  /** Number of observations added. */
  n: number;
  /** Σ w·[(y − μ)² − μ]. */
  sumExcess: number;
  /** Σ w·μ². */
  sumMeanSquared: number;
}

export function emptyDispersion(): DispersionAccumulator {
  return { n: 0, sumExcess: 0, sumMeanSquared: 0 };
}

/** Adds one observation in place (hot loops add millions); returns the same accumulator. */
export function addDispersionObservation(
  acc: DispersionAccumulator,
  observed: number,
  expected: number,
  weight = 1,
): DispersionAccumulator {
  if (!Number.isFinite(observed) || observed < 0) invalid('observed', 'must be a finite count ≥ 0', observed);
  if (!Number.isFinite(expected) || expected < 0) invalid('expected', 'must be a finite mean ≥ 0', expected);
  if (!Number.isFinite(weight) || weight < 0) invalid('weight', 'must be finite and ≥ 0', weight);
  if (expected === 0 || weight === 0) return acc;
  const d = observed - expected;
  acc.n += 1;
  acc.sumExcess += weight * (d * d - expected);
  acc.sumMeanSquared += weight * expected * expected;
  return acc;
}

export function mergeDispersion(a: DispersionAccumulator, b: DispersionAccumulator): DispersionAccumulator {
  return { n: a.n + b.n, sumExcess: a.sumExcess + b.sumExcess, sumMeanSquared: a.sumMeanSquared + b.sumMeanSquared };
}

/**
 * φ̂ from the accumulator, clipped to [0, maxPhi]; `fallback` (default 0, i.e. Poisson) when fewer than
 * `minObservations` observations were added.
 */
export function dispersionEstimate(
  acc: DispersionAccumulator,
  options: { minObservations?: number; fallback?: number; maxPhi?: number } = {},
): number {
  const { minObservations = 1, fallback = 0, maxPhi = Infinity } = options;
  if (acc.n < minObservations || acc.sumMeanSquared <= 0) return fallback;
  return Math.min(maxPhi, Math.max(0, acc.sumExcess / acc.sumMeanSquared));
}

/** φ̂ of a sample of counts given each one's expected mean (optional weights), clipped at 0. */
export function estimateDispersion(
  observed: ArrayLike<number>,
  expected: ArrayLike<number>,
  weights?: ArrayLike<number>,
): number {
  if (observed.length !== expected.length) {
    throw new NearcastError('NEARCAST_STATS_ARGUMENT_INVALID', [
      `expected must have one mean per observation (${observed.length} observed, ${expected.length} expected)`,
    ]);
  }
  if (weights !== undefined && weights.length !== observed.length) {
    throw new NearcastError('NEARCAST_STATS_ARGUMENT_INVALID', [`weights must have one entry per observation`]);
  }
  const acc = emptyDispersion();
  for (let i = 0; i < observed.length; i++) addDispersionObservation(acc, observed[i]!, expected[i]!, weights?.[i] ?? 1);
  return dispersionEstimate(acc);
}

/** One accumulator per volume band; plain JSON. */
export type DispersionPool = Record<VolumeBand, DispersionAccumulator>;

export function emptyDispersionPool(): DispersionPool {
  const pool = {} as DispersionPool;
  for (const band of VOLUME_BANDS) pool[band] = emptyDispersion();
  return pool;
}

/** Adds an observation to the band of its series (by the series' mean units per day), in place. */
export function addToDispersionPool(
  pool: DispersionPool,
  meanUnitsPerDay: number,
  observed: number,
  expected: number,
  weight = 1,
): DispersionPool {
  addDispersionObservation(pool[volumeBandOf(meanUnitsPerDay)], observed, expected, weight);
  return pool;
}

/**
 * φ̂ per band. A band with fewer than `minObservations` observations borrows the estimate of the nearest band
 * that has enough (lower band first on ties), else `fallback`.
 */
export function dispersionByBand(
  pool: DispersionPool,
  options: { minObservations?: number; fallback?: number; maxPhi?: number } = {},
): Record<VolumeBand, number> {
  const { minObservations = 30, fallback = 0 } = options;
  const own = VOLUME_BANDS.map((b) => (pool[b].n >= minObservations ? dispersionEstimate(pool[b], options) : null));
  const out = {} as Record<VolumeBand, number>;
  VOLUME_BANDS.forEach((band, i) => {
    let value: number | null = own[i] ?? null;
    for (let d = 1; value === null && d < VOLUME_BANDS.length; d++) value = own[i - d] ?? own[i + d] ?? null;
    out[band] = value ?? fallback;
  });
  return out;
}

function invalid(field: string, reason: string, value: number): never {
  throw new NearcastError('NEARCAST_STATS_ARGUMENT_INVALID', [`${field} ${reason} (got ${String(value)})`]);
}
