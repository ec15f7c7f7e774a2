import { FRESH_ARRAYS, type ScratchArrays } from './arena.ts';
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
  /** The last version pair rebased and its ratio (consecutive weeks mostly pair the same two). */
  readonly rhoLast: { v: BaselineVersionEntry | undefined; ref: BaselineVersionEntry | undefined; r: number };
}

export function prepareSeries(
  item: string,
  series: SeriesState,
  parts: SeriesParts,
  ctx: RecomputeContext,
  lagDays: number,
  arrays: ScratchArrays = FRESH_ARRAYS,
): SeriesInput {
  const frame = buildSeriesFrame(parts, ctx, lagDays, arrays, series);
  const ref: Array<BaselineVersionEntry | undefined> = [];
  for (let j = 0; j <= ctx.J; j++) ref.push(versionKnownAt(series, ctx.planDay - 7 * j, ctx.cutoffMs));
  const weekBase = arrays.f64(ctx.nWeeks).fill(NaN);
  const weekBaseVersion: Array<BaselineVersionEntry | undefined> = new Array(ctx.nWeeks).fill(undefined);
  for (let p = 0; p <= ctx.H; p++) {
    const w = ctx.firstDay + 7 * p;
    const v = coveringVersionKnownAt(series, w, Math.min(w + 6, ctx.planDay), ctx.cutoffMs);
    if (v) {
      weekBase[p] = weekValue(v, w)!;
      weekBaseVersion[p] = v;
    }
  }
  return { item, series, parts, frame, ref, weekBase, weekBaseVersion, rhoLast: { v: undefined, ref: undefined, r: 1 } };
}

// Level ratios between two versions, kept across recomputes and keyed by the versions' quantity arrays: a
// version's weeks and quantities never change in place (pruning replaces both arrays together), so a replaced
// version simply misses, and a close only computes the pairs its new as-of days bring. A version meets a handful of
// others, so a short list searched in order beats a Map (whose table and boxed numbers the collector walks).
interface PairedRatios {
  readonly refs: Float64Array[];
  /** Unboxed doubles (a packed double array). */
  readonly r: number[];
}
const ratioCache = new WeakMap<Float64Array, PairedRatios>();

function cachedLevelRatio(v: BaselineVersionEntry, ref: BaselineVersionEntry): number {
  let pairs = ratioCache.get(v.quantities);
  if (!pairs) {
    pairs = { refs: [], r: [] };
    ratioCache.set(v.quantities, pairs);
  }
  const at = pairs.refs.indexOf(ref.quantities);
  if (at >= 0) return pairs.r[at]!;
  const r = levelRatio(v, ref);
  pairs.refs.push(ref.quantities);
  pairs.r.push(r);
  return r;
}

/**
 * Baseline of past frame week p rebased onto the version in force at as-of j (NaN when unknown). Each (p, j) is
 * asked for once per recompute, so only the level ratios between versions are memoised.
 */
export function rebasedWeekBaseline(input: SeriesInput, p: number, j: number): number {
  const b = input.weekBase[p]!;
  const v = input.weekBaseVersion[p];
  const ref = input.ref[j];
  if (!Number.isFinite(b) || !v) return NaN;
  if (!ref || ref.version === v.version) return b;
  const last = input.rhoLast;
  if (last.v === v && last.ref === ref) return b * last.r;
  const r = cachedLevelRatio(v, ref);
  last.v = v;
  last.ref = ref;
  last.r = r;
  return b * r;
}
