import { coveringVersionKnownAt, levelRatio, versionKnownAt, weekValue } from './baseline-lookup.ts';
import type { SeriesParts } from './line-parts.ts';
import type { RecomputeContext } from './recompute-context.ts';
import { buildSeriesFrame, type SeriesFrame } from './series-frame.ts';
import type { BaselineVersionEntry, SeriesState } from './series-state.ts';

/** One series prepared for a recompute: its frame and the baseline versions each as-of day saw. */
export interface SeriesInput {
  readonly item: string;
  readonly series: SeriesState;
  readonly parts: SeriesParts;
  readonly frame: SeriesFrame;
  /** Version in force at the end of as-of day j (plan date − 7j), j = 0 … J. */
  readonly ref: ReadonlyArray<BaselineVersionEntry | undefined>;
  /** Baseline of each past frame week as known when the week ended (NaN when none covered it), and its version. */
  readonly weekBase: Float64Array;
  readonly weekBaseVersion: ReadonlyArray<BaselineVersionEntry | undefined>;
  readonly rho: Map<BaselineVersionEntry, Map<BaselineVersionEntry, number>>;
}

export function prepareSeries(item: string, series: SeriesState, parts: SeriesParts, ctx: RecomputeContext, lagDays: number): SeriesInput {
  const frame = buildSeriesFrame(parts, ctx, lagDays);
  const ref: Array<BaselineVersionEntry | undefined> = [];
  for (let j = 0; j <= ctx.J; j++) ref.push(versionKnownAt(series, ctx.planDay - 7 * j, ctx.cutoffMs));
  const weekBase = new Float64Array(ctx.nWeeks).fill(NaN);
  const weekBaseVersion: Array<BaselineVersionEntry | undefined> = new Array(ctx.nWeeks).fill(undefined);
  for (let p = 0; p <= ctx.H; p++) {
    const w = ctx.firstDay + 7 * p;
    const v = coveringVersionKnownAt(series, w, Math.min(w + 6, ctx.planDay), ctx.cutoffMs);
    if (v) {
      weekBase[p] = weekValue(v, w)!;
      weekBaseVersion[p] = v;
    }
  }
  return { item, series, parts, frame, ref, weekBase, weekBaseVersion, rho: new Map() };
}

/**
 * Baseline of past frame week p rebased onto the version in force at as-of j (NaN when unknown). Each (p, j) is
 * asked for once per recompute, so only the level ratios between versions are memoised (in `rho`).
 */
export function rebasedWeekBaseline(input: SeriesInput, p: number, j: number): number {
  const b = input.weekBase[p]!;
  const v = input.weekBaseVersion[p];
  const ref = input.ref[j];
  if (!Number.isFinite(b) || !v) return NaN;
  if (!ref || ref.version === v.version) return b;
  let byRef = input.rho.get(v);
  if (!byRef) {
    byRef = new Map();
    input.rho.set(v, byRef);
  }
  let r = byRef.get(ref);
  if (r === undefined) {
    r = levelRatio(v, ref);
    byRef.set(ref, r);
  }
  return b * r;
}
