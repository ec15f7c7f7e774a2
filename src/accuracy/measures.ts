// Forecast accuracy measures over a set of forecast/actual pairs (series-weeks). Errors are forecast − actual,
// so a positive bias means over-forecasting. Ratios are volume-weighted (WAPE is Σ|error| / Σ actual, the
// "MAD/Mean ratio" of Kolassa & Schütz 2007), so large series count by their volume and zero-demand weeks do not
// divide by zero. Every measure is null where it is undefined (no actual volume, no pairs).

import { NearcastError } from '../errors.ts';

function argError(detail: string): never {
  throw new NearcastError('NEARCAST_STATS_ARGUMENT_INVALID', [detail]);
}

function checkPairs(forecast: ArrayLike<number>, actual: ArrayLike<number>): void {
  if (forecast.length !== actual.length) argError(`forecast has ${forecast.length} values for ${actual.length} actuals`);
  for (let i = 0; i < actual.length; i++) {
    if (!Number.isFinite(forecast[i]!)) argError(`forecast[${i}] must be finite (got ${String(forecast[i])})`);
    if (!Number.isFinite(actual[i]!) || actual[i]! < 0) argError(`actual[${i}] must be finite and ≥ 0 (got ${String(actual[i])})`);
  }
}

/** Σ|f − a| / Σa; null when Σa = 0. */
export function wape(forecast: ArrayLike<number>, actual: ArrayLike<number>): number | null {
  checkPairs(forecast, actual);
  let e = 0;
  let s = 0;
  for (let i = 0; i < actual.length; i++) {
    e += Math.abs(forecast[i]! - actual[i]!);
    s += actual[i]!;
  }
  return s > 0 ? e / s : null;
}

/** Σ(f − a) / Σa, positive = over-forecast; null when Σa = 0. */
export function bias(forecast: ArrayLike<number>, actual: ArrayLike<number>): number | null {
  checkPairs(forecast, actual);
  let e = 0;
  let s = 0;
  for (let i = 0; i < actual.length; i++) {
    e += forecast[i]! - actual[i]!;
    s += actual[i]!;
  }
  return s > 0 ? e / s : null;
}

/**
 * Forecast value added, (WAPE_baseline − WAPE_adjusted) / WAPE_baseline: the share of the baseline's error that
 * the adjustment removed (positive = sensing helps, −0.1 = 10% more error). Null when either is undefined or the
 * baseline was perfect.
 */
export function fva(wapeBaseline: number | null, wapeAdjusted: number | null): number | null {
  if (wapeBaseline === null || wapeAdjusted === null || !(wapeBaseline > 0)) return null;
  return (wapeBaseline - wapeAdjusted) / wapeBaseline;
}

/**
 * 1 when lower < actual < upper, ½ when the actual sits on either end (counts are discrete, so a band end is hit
 * often; counting it fully in or fully out would bias the coverage of a p10–p90 band), 0 outside.
 */
export function bandHit(lower: number, upper: number, actual: number): 0 | 0.5 | 1 {
  if (!(lower <= upper)) argError(`band lower end (${lower}) must not exceed its upper end (${upper})`);
  if (actual < lower || actual > upper) return 0;
  if (actual === lower || actual === upper) return 0.5;
  return 1;
}

/** Share of actuals inside their bands, ties at the ends counted half; null for no pairs. */
export function bandCoverage(lower: ArrayLike<number>, upper: ArrayLike<number>, actual: ArrayLike<number>): number | null {
  if (lower.length !== actual.length || upper.length !== actual.length) {
    argError(`band ends (${lower.length}, ${upper.length}) must match the actuals (${actual.length})`);
  }
  if (actual.length === 0) return null;
  let hits = 0;
  for (let i = 0; i < actual.length; i++) hits += bandHit(lower[i]!, upper[i]!, actual[i]!);
  return hits / actual.length;
}

/** Running sums behind WAPE and bias of one forecast; plain JSON. */
export interface ErrorSums {
  /** Σ|f − a| */
  absError: number;
  /** Σ(f − a) */
  error: number;
  /** Σa */
  actual: number;
}

export function emptyErrorSums(): ErrorSums {
  return { absError: 0, error: 0, actual: 0 };
}

/** Adds one pair in place; returns the same object. */
export function addError(sums: ErrorSums, forecast: number, actual: number): ErrorSums {
  sums.absError += Math.abs(forecast - actual);
  sums.error += forecast - actual;
  sums.actual += actual;
  return sums;
}

export function wapeOf(sums: ErrorSums): number | null {
  return sums.actual > 0 ? sums.absError / sums.actual : null;
}

export function biasOf(sums: ErrorSums): number | null {
  return sums.actual > 0 ? sums.error / sums.actual : null;
}
