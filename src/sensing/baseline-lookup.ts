import type { BaselineVersionEntry, SeriesState } from './series-state.ts';

// "The baseline of week w as known at moment t": the highest version known by then. A version that does not
// cover w leaves w without a baseline at that version (a fallback, never a zero).

/** Highest version known by the end of local day `day` (and, when given, by the instant `cutoffMs`). */
export function versionKnownAt(series: SeriesState, day: number, cutoffMs = Infinity): BaselineVersionEntry | undefined {
  // Versions are kept in ascending order, each once (see SeriesState): the first known one from the top is the answer.
  const list = series.baselines;
  for (let k = list.length - 1; k >= 0; k--) {
    const b = list[k]!;
    if (b.knownDay <= day && b.knownMs <= cutoffMs) return b;
  }
  return undefined;
}

/** Quantity of a week in a version, undefined when the version does not cover it. */
export function weekValue(v: BaselineVersionEntry | undefined, weekDay: number): number | undefined {
  if (!v) return undefined;
  const w = v.weeks;
  let lo = 0;
  let hi = w.length - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const x = w[mid]!;
    if (x === weekDay) return v.quantities[mid]!;
    if (x < weekDay) lo = mid + 1;
    else hi = mid - 1;
  }
  return undefined;
}

/** Highest version known by then that covers the week (the fallback when the newest one does not). */
export function coveringVersionKnownAt(series: SeriesState, weekDay: number, day: number, cutoffMs = Infinity): BaselineVersionEntry | undefined {
  const list = series.baselines;
  for (let k = list.length - 1; k >= 0; k--) {
    const b = list[k]!;
    if (b.knownDay <= day && b.knownMs <= cutoffMs && weekValue(b, weekDay) !== undefined) return b;
  }
  return undefined;
}

/** Most weeks compared when measuring how a re-plan moved the level. */
export const REBASE_WEEKS = 8;

/**
 * Level of `ref` relative to `v` over the weeks both cover (the first REBASE_WEEKS of them): multiplying a ratio
 * measured against `v` by v/ref rebases it onto `ref`, so a re-plan to a new level is not sensed a second time.
 * Versions also wobble week by week without any re-plan; that wobble must not read as a level change, so the log
 * level ratio is shrunk by its own evidence (positive-part James–Stein: kept in full when it stands well clear of
 * its standard error, dropped when it is within about two of them). 1 when they are the same version or share no
 * week with positive quantity.
 */
export function levelRatio(v: BaselineVersionEntry, ref: BaselineVersionEntry): number {
  if (v === ref || v.version === ref.version) return 1;
  let i = 0;
  let j = 0;
  let sv = 0;
  let sr = 0;
  const logs: number[] = [];
  const a = v.weeks;
  const b = ref.weeks;
  while (i < a.length && j < b.length && logs.length < REBASE_WEEKS) {
    if (a[i]! === b[j]!) {
      const qv = v.quantities[i]!;
      const qr = ref.quantities[j]!;
      if (qv > 0 && qr > 0) {
        sv += qv;
        sr += qr;
        logs.push(Math.log(qr / qv));
      }
      i++;
      j++;
    } else if (a[i]! < b[j]!) i++;
    else j++;
  }
  if (!(sv > 0 && sr > 0)) return 1;
  const level = Math.log(sr / sv);
  if (logs.length < 2 || level === 0) return Math.exp(level);
  // Plain loops (same left-to-right sums as a reduce from 0): this runs for every version pair of every series.
  let sumLogs = 0;
  for (let k = 0; k < logs.length; k++) sumLogs += logs[k]!;
  const mean = sumLogs / logs.length;
  let sumSq = 0;
  for (let k = 0; k < logs.length; k++) sumSq += (logs[k]! - mean) ** 2;
  const var1 = sumSq / (logs.length - 1);
  const se2 = var1 / logs.length;
  const keep = Math.max(0, 1 - (4 * se2) / (level * level));
  return Math.exp(keep * level);
}
