// Weighted order statistics for the location factor and winsorising. (src/stats/robust.ts was not yet available
// when this was written; these are the two the sensing engine needs, kept deterministic on ties.)

/**
 * Weighted quantile by the lower-value rule: the smallest value whose cumulative weight reaches q of the total.
 * Zero or negative weights are ignored; NaN when no value has weight.
 */
export function weightedQuantile(values: ArrayLike<number>, weights: ArrayLike<number>, q: number): number {
  const idx: number[] = [];
  let total = 0;
  for (let i = 0; i < values.length; i++) {
    const w = weights[i]!;
    if (w > 0 && Number.isFinite(values[i]!)) {
      idx.push(i);
      total += w;
    }
  }
  if (idx.length === 0) return NaN;
  idx.sort((a, b) => values[a]! - values[b]! || a - b);
  const target = q * total;
  let cum = 0;
  for (const i of idx) {
    cum += weights[i]!;
    if (cum >= target - 1e-12 * total) return values[i]!;
  }
  return values[idx[idx.length - 1]!]!;
}

/** Weighted median, averaging the two middle values when the weight splits exactly between them. */
export function weightedMedian(values: ArrayLike<number>, weights: ArrayLike<number>): number {
  const lo = weightedQuantile(values, weights, 0.5);
  const idx: number[] = [];
  let total = 0;
  for (let i = 0; i < values.length; i++) {
    if (!(weights[i]! > 0) || !Number.isFinite(values[i]!)) continue;
    idx.push(i);
    total += weights[i]!;
  }
  if (idx.length === 0) return NaN;
  let below = 0;
  for (const i of idx) if (values[i]! <= lo) below += weights[i]!;
  if (Math.abs(below - total / 2) > 1e-12 * total) return lo;
  let hi = Infinity;
  for (const i of idx) if (values[i]! > lo && values[i]! < hi) hi = values[i]!;
  return hi === Infinity ? lo : (lo + hi) / 2;
}

/**
 * Variance of week-to-week noise from successive differences (half their mean square, von Neumann's estimator):
 * a slow drift of the level barely enters it. NaN with fewer than two differences.
 */
export function successiveDifferenceVariance(values: ArrayLike<number>): number {
  let prev = NaN;
  let ss = 0;
  let n = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    if (!Number.isFinite(v)) continue;
    if (Number.isFinite(prev)) {
      ss += (v - prev) * (v - prev);
      n++;
    }
    prev = v;
  }
  return n < 2 ? NaN : ss / n / 2;
}
