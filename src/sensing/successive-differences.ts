// Week-to-week noise of a short series of weekly ratios.

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
