// The recent level over an adaptive window. A long window (half-life of weeks) is precise while the level holds; a
// short one follows a real shift within a week or two. Both are computed; when they differ by more than their
// joint noise the short one takes over, smoothly, so a stable series is measured over many weeks and a shifted one
// over the weeks since the shift.

export interface AdaptiveLevel {
  /** Normalised weight per age (sums to 1 over usable ages; 0 elsewhere). */
  readonly weights: number[];
  /** Share of the short window in the blend (0 … 1). */
  readonly shortShare: number;
  /** Σ weight² (the variance factor of a weighted mean of independent weeks). */
  readonly sumSquares: number;
}

function normalisedWeights(values: ArrayLike<number>, halfLife: number): number[] {
  const w: number[] = new Array(values.length).fill(0);
  let sum = 0;
  for (let age = 0; age < values.length; age++) {
    if (!Number.isFinite(values[age]!)) continue;
    w[age] = 0.5 ** (age / halfLife);
    sum += w[age]!;
  }
  if (sum > 0) for (let age = 0; age < w.length; age++) w[age] = w[age]! / sum;
  return w;
}

/**
 * Blend of short and long recency weights over `values` by age (NaN = unusable), given the weekly noise variance:
 * all long while the two differ by less than `switchFrom` standard errors, all short beyond `switchTo`.
 */
export function adaptiveLevel(
  values: ArrayLike<number>,
  noiseVar: number,
  shortHalfLife: number,
  longHalfLife: number,
  switchFrom: number,
  switchTo: number,
): AdaptiveLevel {
  const ws = normalisedWeights(values, shortHalfLife);
  const wl = normalisedWeights(values, longHalfLife);
  let short = 0;
  let long = 0;
  let diff2 = 0;
  let any = false;
  for (let age = 0; age < values.length; age++) {
    if (!Number.isFinite(values[age]!)) continue;
    any = true;
    short += ws[age]! * values[age]!;
    long += wl[age]! * values[age]!;
    diff2 += (ws[age]! - wl[age]!) ** 2;
  }
  let a = 0;
  if (any && diff2 > 0 && noiseVar > 0) {
    const z = Math.abs(short - long) / Math.sqrt(noiseVar * diff2);
    a = Math.min(1, Math.max(0, (z - switchFrom) / (switchTo - switchFrom)));
  }
  const weights: number[] = new Array(values.length).fill(0);
  let ss = 0;
  for (let age = 0; age < values.length; age++) {
    weights[age] = a * ws[age]! + (1 - a) * wl[age]!;
    ss += weights[age]! ** 2;
  }
  return { weights, shortShare: a, sumSquares: ss };
}
