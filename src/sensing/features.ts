import type { LocationSignal, SeriesTerms } from './as-of-signals.ts';
import type { RecomputeContext } from './recompute-context.ts';
import { at, censoredAsOf } from './series-frame.ts';
import type { SeriesInput } from './series-input.ts';

// The regression's terms, all as shares of the baseline of the target week, so the identity model
// "adjusted = baseline" is every term at 0. With r the evidence-gated recent level (decayed toward 1 with lead) and
// τ the series' typical share booked by now, the pickup forecast is booked + expected remaining × ratio:
//   B + (1 − τ)·b·r  =  b·[1 + (r − 1) + (B − τ·b·r)/b].
// So the level terms carry r − 1 (location and series parts apart) and the book term carries only the book beyond
// what that level already implies: booked orders are counted once, never again through the level, and a customer
// mix that books early (high τ) is not read as a surge.

export const FEATURE_NAMES = ['orderBook', 'locationLevel', 'seriesLevel', 'weekToDate', 'holiday'] as const;
export type FeatureName = (typeof FEATURE_NAMES)[number];
export const FEATURE_COUNT = FEATURE_NAMES.length;
/**
 * Coefficients the ridge prior pulls toward. Booked orders and evidence-gated level changes carry through one for
 * one (the pickup identity booked + expected remaining × ratio); the week-to-date and holiday terms start at 0.
 * Where the evidence gates are closed every term is 0 and the model is "adjusted = baseline".
 */
export const FEATURE_PRIOR: readonly number[] = [1, 1, 1, 0, 0];

export interface Features {
  readonly x: number[];
  readonly baseline: number;
  /** Order book for the week as known at the as-of moment, without and only large lines. */
  readonly booked: number;
  readonly bookedLarge: number;
  /** Lead 0: demand dated up to the as-of day (large lines excluded). */
  readonly toDate: number;
  readonly bookShare: number;
  /** Order book over the series' own typical book; null when the series books nothing ahead. */
  readonly coverage: number | null;
  /** Evidence-gated recent ratio (location factor × series factor). */
  readonly recentRatio: number;
  readonly locationFactor: number;
  readonly seriesFactor: number;
}

/** Order book of week p as known at the as-of moment of `lead` (large lines excluded). */
export function bookedAt(input: SeriesInput, ctx: RecomputeContext, p: number, lead: number): number {
  const f = input.frame;
  return lead === 0 ? f.known0[p]! : at(f.book, ctx, p, ctx.settings.maxLead - lead);
}

/** Lead 0: demand dated up to the as-of day (large lines excluded); 0 at later leads. */
export function toDateAt(input: SeriesInput, p: number, lead: number): number {
  return lead === 0 ? input.frame.toDate0[p]! : 0;
}

/**
 * Writes the FEATURE_COUNT terms into x[0 …] (a plain function over a caller's buffer: training rows call it for
 * every series, week and lead without allocating a row object).
 */
export function featureTermsInto(
  x: { [i: number]: number },
  input: SeriesInput,
  tau: number,
  toDateShare: number,
  q: number,
  loc: LocationSignal,
  ctx: RecomputeContext,
  p: number,
  lead: number,
  baseline: number,
  booked: number,
  toDate: number,
): void {
  const s = ctx.settings;
  const f = input.frame;
  const R = loc.factor;
  const decay = s.leadDecayPerWeek ** lead;
  // Expected level of the week (decayed toward the baseline with lead), and the book beyond what that level implies.
  const level = 1 + (R * q - 1) * decay;
  x[0] = (booked - tau * baseline * level) / baseline;
  x[1] = (R - 1) * decay;
  x[2] = R * (q - 1) * decay;
  x[3] = 0;
  if (lead === 0) {
    let td = ((1 - tau) * (toDate - toDateShare * baseline * level)) / baseline;
    // A censored shipment day is never a reason to adjust down.
    if (td < 0 && censoredAsOf(f, ctx, p, ctx.firstDay + 7 * p + ctx.k)) td = 0;
    x[3] = td;
  }
  x[4] = ctx.holidayLoss[p]!;
}

export function computeFeatures(
  input: SeriesInput,
  sig: SeriesTerms,
  loc: LocationSignal,
  ctx: RecomputeContext,
  p: number,
  lead: number,
  baseline: number,
): Features {
  const s = ctx.settings;
  const f = input.frame;
  const jc = s.maxLead - lead;
  const booked = bookedAt(input, ctx, p, lead);
  const bookedLarge = lead === 0 ? f.known0Large[p]! : at(f.bookLarge, ctx, p, jc);
  const toDate = toDateAt(input, p, lead);
  const tau = sig.bookShare[lead]!;
  const R = loc.factor;
  const q = sig.seriesFactor;
  const x: number[] = [0, 0, 0, 0, 0];
  featureTermsInto(x, input, tau, sig.toDateShare, q, loc, ctx, p, lead, baseline, booked, toDate);
  return {
    x,
    baseline,
    booked,
    bookedLarge,
    toDate,
    bookShare: tau,
    coverage: tau * baseline > 0 ? booked / (tau * baseline) : null,
    recentRatio: R * q,
    locationFactor: R,
    seriesFactor: q,
  };
}

/** 1 + Σ β·x: the predicted ratio to the baseline. */
export function predictRatio(coefficients: ArrayLike<number>, x: ArrayLike<number>): number {
  let r = 1;
  for (let i = 0; i < FEATURE_COUNT; i++) r += coefficients[i]! * x[i]!;
  return r;
}
