// Self-check: does sensing lose to the baseline, significantly, at a location and lead? If so, fall back to the
// baseline there until it no longer does.
//
// Evidence: the per-week loss differential dₜ = Σ|adjusted − actual| − Σ|baseline − actual| over the series of
// the location (positive = sensing lost units that week), over the latest `windowWeeks` complete weeks. Weeks are
// the independent units — series within a week share its shocks, so counting series-weeks as independent would
// overstate the evidence. Mean of dₜ over the window, divided by mean weekly actual, is exactly the difference of
// the window's WAPEs.
//
// Tests (one-sided, H₁: sensing is worse):
// - 'hln' (default): Diebold–Mariano on dₜ with the Harvey–Leybourne–Newbold small-sample correction — the
//   long-run variance uses autocovariances up to lag h − 1 (h = lead + 1 weeks ahead, since a forecast made h
//   weeks before overlaps the next h − 1 forecasts' information), the statistic is scaled by
//   √((n + 1 − 2h + h(h − 1)/n)/n) and referred to Student's t with n − 1 degrees of freedom. Diebold & Mariano
//   (1995) JBES 13(3); Harvey, Leybourne & Newbold (1997) IJF 13(2) (both recalled from memory). When the
//   truncated long-run variance comes out ≤ 0 (possible in short samples) the lag-0 variance is used instead
//   (common practice).
// - 'sign': exact binomial sign test on the weeks with dₜ ≠ 0 — ignores sizes, so one wild promotion week
//   cannot decide it.
//
// Hysteresis: the fallback turns on when p < `onBelowP` (and the window's relative WAPE loss exceeds
// `minRelativeLoss`), stays on for at least `minWeeksInFallback` evaluations, and turns off only when
// p > `offAboveP` — i.e. once the shadow-scored sensed plan no longer looks worse at all, a stricter bar than
// "no longer significantly worse". Each completed week is evaluated once; re-evaluating the same or an older week
// changes nothing. State is plain JSON, returned new (the input is not changed).

import { NearcastError } from '../errors.ts';
import { studentTSf } from '../stats/continuous-distributions.ts';
import { binomialSf } from '../stats/count-distributions.ts';

/** One complete week's totals at a location and lead. */
export interface WeeklyErrors {
  readonly weekStart: string;
  readonly seriesWeeks: number;
  readonly actual: number;
  readonly absErrorBaseline: number;
  readonly absErrorAdjusted: number;
}

export type SelfCheckTest = 'hln' | 'sign';

export interface SelfCheckSettings {
  readonly test: SelfCheckTest;
  /** Fewest complete weeks before any decision. */
  readonly minWeeks: number;
  /** Latest weeks the test looks at. */
  readonly windowWeeks: number;
  readonly onBelowP: number;
  readonly offAboveP: number;
  readonly minWeeksInFallback: number;
  /** (WAPE adjusted − WAPE baseline) / WAPE baseline must exceed this to turn the fallback on. */
  readonly minRelativeLoss: number;
}

/** Defaults: common practice, not published constants. */
export const DEFAULT_SELF_CHECK_SETTINGS: SelfCheckSettings = Object.freeze({
  test: 'hln',
  minWeeks: 6,
  windowWeeks: 13,
  onBelowP: 0.05,
  offAboveP: 0.5,
  minWeeksInFallback: 4,
  minRelativeLoss: 0,
});

export interface SelfCheckEvidence {
  test: SelfCheckTest;
  weeks: number;
  /** Mean of dₜ in units; positive = sensing worse. */
  meanWeeklyDifference: number;
  statistic: number | null;
  /** One-sided p-value of "sensing is worse"; null when it could not be computed. */
  pValue: number | null;
}

export interface SelfCheckEntry {
  fallbackActive: boolean;
  /** The week whose evaluation last switched the fallback on or off. */
  since: string | null;
  /** Evaluations since the last switch. */
  weeksInState: number;
  lastEvaluatedWeek: string | null;
  evidence: SelfCheckEvidence | null;
}

export interface SelfCheckState {
  readonly version: 1;
  /** location → lead → entry */
  readonly entries: Readonly<Record<string, Readonly<Record<string, SelfCheckEntry>>>>;
}

export type SelfCheckReason =
  | 'already-evaluated'
  | 'too-few-weeks'
  | 'no-significant-loss'
  | 'sensing-loses'
  | 'holding-minimum'
  | 'still-losing'
  | 'sensing-no-longer-loses';

export interface SelfCheckDecision {
  readonly location: string;
  readonly lead: number;
  readonly throughWeek: string;
  readonly fallbackActive: boolean;
  /** The fallback switched on or off with this evaluation. */
  readonly changed: boolean;
  readonly reason: SelfCheckReason;
  readonly evidence: SelfCheckEvidence | null;
  /** Window WAPEs (null without actual volume). */
  readonly wapeBaseline: number | null;
  readonly wapeAdjusted: number | null;
}

function argError(detail: string): never {
  throw new NearcastError('NEARCAST_STATS_ARGUMENT_INVALID', [detail]);
}

export function emptySelfCheck(): SelfCheckState {
  return { version: 1, entries: {} };
}

const INITIAL: SelfCheckEntry = Object.freeze({
  fallbackActive: false,
  since: null,
  weeksInState: 0,
  lastEvaluatedWeek: null,
  evidence: null,
}) as SelfCheckEntry;

export function selfCheckEntry(state: SelfCheckState, location: string, lead: number): SelfCheckEntry {
  return state.entries[location]?.[String(lead)] ?? INITIAL;
}

export function isFallbackActive(state: SelfCheckState, location: string, lead: number): boolean {
  return selfCheckEntry(state, location, lead).fallbackActive;
}

function checkSettings(s: SelfCheckSettings): void {
  const prob = (v: number, f: string): void => {
    if (!(v > 0 && v < 1)) argError(`${f} must lie strictly between 0 and 1 (got ${v})`);
  };
  prob(s.onBelowP, 'onBelowP');
  prob(s.offAboveP, 'offAboveP');
  if (s.offAboveP <= s.onBelowP) argError(`offAboveP (${s.offAboveP}) must exceed onBelowP (${s.onBelowP}) for hysteresis`);
  if (!Number.isInteger(s.minWeeks) || s.minWeeks < 3) argError(`minWeeks must be an integer ≥ 3 (got ${s.minWeeks})`);
  if (!Number.isInteger(s.windowWeeks) || s.windowWeeks < s.minWeeks) argError(`windowWeeks must be an integer ≥ minWeeks`);
  if (!Number.isInteger(s.minWeeksInFallback) || s.minWeeksInFallback < 0) argError('minWeeksInFallback must be an integer ≥ 0');
  if (!Number.isFinite(s.minRelativeLoss)) argError('minRelativeLoss must be finite');
  if (s.test !== 'hln' && s.test !== 'sign') argError(`test must be 'hln' or 'sign' (got ${String(s.test)})`);
}

/** One-sided HLN-corrected Diebold–Mariano test of mean(d) > 0 at horizon h. */
export function hlnTest(d: readonly number[], h: number): { statistic: number | null; pValue: number | null } {
  const n = d.length;
  if (n < 2 || !Number.isInteger(h) || h < 1) return { statistic: null, pValue: null };
  const mean = d.reduce((a, b) => a + b, 0) / n;
  const gamma = (k: number): number => {
    let s = 0;
    for (let t = k; t < n; t++) s += (d[t]! - mean) * (d[t - k]! - mean);
    return s / n;
  };
  const g0 = gamma(0);
  let lrv = g0;
  for (let k = 1; k < h && k < n; k++) lrv += 2 * gamma(k);
  if (!(lrv > 0)) lrv = g0;
  // Every week differed by the same amount: no noise to test against; the sign of the mean decides.
  if (!(lrv > 1e-300 * (1 + mean * mean))) {
    return { statistic: null, pValue: mean > 0 ? 0 : mean < 0 ? 1 : 0.5 };
  }
  const correction = (n + 1 - 2 * h + (h * (h - 1)) / n) / n;
  if (!(correction > 0)) return { statistic: null, pValue: null };
  const dm = mean / Math.sqrt(lrv / n);
  const statistic = dm * Math.sqrt(correction);
  return { statistic, pValue: studentTSf(statistic, n - 1) };
}

/** One-sided exact sign test of P[d > 0] > ½, ties (d = 0) dropped. */
export function signTest(d: readonly number[]): { statistic: number | null; pValue: number | null } {
  let pos = 0;
  let nonzero = 0;
  for (const v of d) {
    if (v > 0) pos++;
    if (v !== 0) nonzero++;
  }
  if (nonzero === 0) return { statistic: 0, pValue: 1 };
  return { statistic: pos, pValue: binomialSf(pos, nonzero, 0.5) };
}

export interface SelfCheckInput {
  readonly location: string;
  readonly lead: number;
  /** The latest complete week; weeks after it are ignored. */
  readonly throughWeek: string;
  /** Weekly totals for this location and lead (any order; later duplicates of a week replace earlier ones). */
  readonly weeks: readonly WeeklyErrors[];
}

/** Evaluates one location and lead for a newly completed week; returns the new state and the decision. */
export function evaluateSelfCheck(
  state: SelfCheckState,
  input: SelfCheckInput,
  settings: SelfCheckSettings = DEFAULT_SELF_CHECK_SETTINGS,
): { state: SelfCheckState; decision: SelfCheckDecision } {
  checkSettings(settings);
  const { location, lead, throughWeek } = input;
  if (typeof location !== 'string' || location.length === 0) argError('location must be a non-empty id');
  if (!Number.isInteger(lead) || lead < 0) argError(`lead must be an integer ≥ 0 (got ${lead})`);
  const prev = selfCheckEntry(state, location, lead);

  const byWeek = new Map<string, WeeklyErrors>();
  for (const w of input.weeks) {
    for (const [f, v] of [['actual', w.actual], ['absErrorBaseline', w.absErrorBaseline], ['absErrorAdjusted', w.absErrorAdjusted]] as const) {
      if (!Number.isFinite(v) || v < 0) argError(`week ${w.weekStart}: ${f} must be finite and ≥ 0 (got ${String(v)})`);
    }
    if (w.weekStart <= throughWeek) byWeek.set(w.weekStart, w);
  }
  const window = [...byWeek.keys()].sort().slice(-settings.windowWeeks).map((k) => byWeek.get(k)!);
  let actual = 0;
  let aeBase = 0;
  let aeAdj = 0;
  for (const w of window) {
    actual += w.actual;
    aeBase += w.absErrorBaseline;
    aeAdj += w.absErrorAdjusted;
  }
  const wapeBaseline = actual > 0 ? aeBase / actual : null;
  const wapeAdjusted = actual > 0 ? aeAdj / actual : null;
  const decide = (entry: SelfCheckEntry, changed: boolean, reason: SelfCheckReason): ReturnType<typeof evaluateSelfCheck> => ({
    state: entry === prev ? state : withEntry(state, location, lead, entry),
    decision: { location, lead, throughWeek, fallbackActive: entry.fallbackActive, changed, reason, evidence: entry.evidence, wapeBaseline, wapeAdjusted },
  });

  if (prev.lastEvaluatedWeek !== null && throughWeek <= prev.lastEvaluatedWeek) return decide(prev, false, 'already-evaluated');

  const d = window.map((w) => w.absErrorAdjusted - w.absErrorBaseline);
  const mean = d.length > 0 ? d.reduce((a, b) => a + b, 0) / d.length : 0;
  const tested = settings.test === 'hln' ? hlnTest(d, lead + 1) : signTest(d);
  const evidence: SelfCheckEvidence = { test: settings.test, weeks: d.length, meanWeeklyDifference: mean, ...tested };
  const base = { ...prev, lastEvaluatedWeek: throughWeek, evidence, weeksInState: prev.weeksInState + 1 };

  if (window.length < settings.minWeeks || evidence.pValue === null) return decide(base, false, 'too-few-weeks');
  const p = evidence.pValue;
  if (!prev.fallbackActive) {
    const relativeLoss = wapeBaseline !== null && wapeBaseline > 0 && wapeAdjusted !== null ? (wapeAdjusted - wapeBaseline) / wapeBaseline : mean > 0 ? Infinity : 0;
    if (p < settings.onBelowP && relativeLoss > settings.minRelativeLoss) {
      return decide({ ...base, fallbackActive: true, since: throughWeek, weeksInState: 0 }, true, 'sensing-loses');
    }
    return decide(base, false, 'no-significant-loss');
  }
  if (base.weeksInState < settings.minWeeksInFallback) return decide(base, false, 'holding-minimum');
  if (p > settings.offAboveP) {
    return decide({ ...base, fallbackActive: false, since: throughWeek, weeksInState: 0 }, true, 'sensing-no-longer-loses');
  }
  return decide(base, false, 'still-losing');
}

function withEntry(state: SelfCheckState, location: string, lead: number, entry: SelfCheckEntry): SelfCheckState {
  const byLead = state.entries[location] ?? {};
  return { ...state, entries: { ...state.entries, [location]: { ...byLead, [String(lead)]: entry } } };
}
