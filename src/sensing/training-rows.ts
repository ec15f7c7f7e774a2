import type { TrainingSignals } from './as-of-signals.ts';
import { FRESH_ARRAYS, type ScratchArrays } from './arena.ts';
import { weekValue } from './baseline-lookup.ts';
import { bookedAt, featureTermsInto, FEATURE_COUNT, toDateAt } from './features.ts';
import type { RecomputeContext } from './recompute-context.ts';
import { at } from './series-frame.ts';
import type { SeriesInput } from './series-input.ts';
import { capFactors, recencyWeight } from './weights.ts';

/**
 * Training rows of one lead: every sensed series × complete past week of the lookback, the target being the week's
 * final demand over the baseline version in force at the as-of moment L weeks before (same weekday), the features
 * as known at that moment. Weighted by recency times the inverse of the series' ratio noise, with a cap on any one
 * series' share of the weight.
 */
export interface TrainingRows {
  readonly lead: number;
  readonly n: number;
  /** Feature columns (FEATURE_COUNT of them) and the target ratio. */
  readonly columns: Float64Array[];
  readonly y: Float64Array;
  readonly weight: Float64Array;
  readonly seriesIndex: Int32Array;
  readonly weeksAgo: Int32Array;
  readonly baseline: Float64Array;
  readonly demand: Float64Array;
  readonly booked: Float64Array;
  readonly toDate: Float64Array;
  readonly perDay: Float64Array;
  readonly recency: Float64Array;
  /** 1 for rows of small series (weight 0 in the fit). */
  readonly small: Uint8Array;
  readonly series: number;
}

export function trainingRows(
  inputs: readonly SeriesInput[],
  signals: readonly TrainingSignals[],
  ctx: RecomputeContext,
  lead: number,
  arrays: ScratchArrays = FRESH_ARRAYS,
): TrainingRows {
  const s = ctx.settings;
  const cap = inputs.length * s.lookbackWeeks;
  const columns = Array.from({ length: FEATURE_COUNT }, () => arrays.f64(cap));
  const y = arrays.f64(cap);
  const weight = arrays.f64(cap);
  const seriesIndex = arrays.i32(cap);
  const weeksAgo = arrays.i32(cap);
  const baseline = arrays.f64(cap);
  const demand = arrays.f64(cap);
  const booked = arrays.f64(cap);
  const toDate = arrays.f64(cap);
  const perDay = arrays.f64(cap);
  const recency = arrays.f64(cap);
  const small = arrays.u8(cap);
  const x = new Float64Array(FEATURE_COUNT);
  let m = 0;
  // Series by series (each series' frame is read for all its weeks while in cache); the rows come out grouped by
  // series, weeks newest first within each.
  const weeks = s.lookbackWeeks;
  const recencyOf = new Float64Array(weeks + 1);
  for (let n = 1; n <= weeks; n++) recencyOf[n] = recencyWeight(n - 1, s.halfLifeWeeks);
  for (let i = 0; i < inputs.length; i++) {
    const input = inputs[i]!;
    const frame = input.frame;
    const first = frame.firstActivityDay;
    if (first === null) continue;
    for (let n = 1; n <= weeks; n++) {
      const sig = signals[n + lead]!;
      const ref = sig.ref[i];
      if (!sig.present[i] || !ref) continue;
      const p = ctx.H - n;
      const weekDay = ctx.firstDay + 7 * p;
      if (first > weekDay || sig.historyWeeks[i]! < s.newSeriesWeeks) continue;
      if (frame.censored[p]) continue;
      const b = weekValue(ref, weekDay);
      if (b === undefined || !(b > 0)) continue;
      const rowBooked = bookedAt(input, ctx, p, lead);
      const rowToDate = toDateAt(input, p, lead);
      featureTermsInto(x, input, sig.bookShare[i * sig.width + lead]!, sig.toDateShare[i]!, sig.seriesFactor[i]!, sig.location, ctx, p, lead, b, rowBooked, rowToDate);
      const d = at(frame.demand, ctx, p, ctx.NC);
      for (let c = 0; c < FEATURE_COUNT; c++) columns[c]![m] = x[c]!;
      y[m] = d / b;
      // Small series stay out of the fit (weight 0) but their rows still inform the dispersion of their band.
      const rowRecency = recencyOf[n]!;
      recency[m] = rowRecency;
      const isSmall = sig.small[i]!;
      weight[m] = isSmall ? 0 : rowRecency / sig.noiseVar[i]!;
      small[m] = isSmall;
      seriesIndex[m] = i;
      weeksAgo[m] = n;
      baseline[m] = b;
      demand[m] = d;
      booked[m] = rowBooked;
      toDate[m] = rowToDate;
      perDay[m] = sig.perDay[i]!;
      m++;
    }
  }
  const totals = new Float64Array(inputs.length);
  for (let r = 0; r < m; r++) totals[seriesIndex[r]!] = totals[seriesIndex[r]!]! + weight[r]!;
  const factors = capFactors(totals, s.maxSeriesWeightShare);
  let seriesCount = 0;
  for (let i = 0; i < inputs.length; i++) if (totals[i]! > 0) seriesCount++;
  for (let r = 0; r < m; r++) weight[r] = weight[r]! * factors[seriesIndex[r]!]!;
  const cut = <T extends Float64Array | Int32Array | Uint8Array>(a: T): T => a.subarray(0, m) as T;
  return {
    lead,
    n: m,
    columns: columns.map(cut),
    y: cut(y),
    weight: cut(weight),
    seriesIndex: cut(seriesIndex),
    weeksAgo: cut(weeksAgo),
    baseline: cut(baseline),
    demand: cut(demand),
    booked: cut(booked),
    toDate: cut(toDate),
    perDay: cut(perDay),
    recency: cut(recency),
    small: cut(small),
    series: seriesCount,
  };
}
