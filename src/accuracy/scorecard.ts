// The scorecard: scored series-weeks summed per location, lead, week and volume band, as plain JSON state.
//
// A week is scored as one batch per (location, lead, week) — every series' actual, the baseline known at that lead
// and the sensed plan — and a re-score of the same batch replaces it, so a restated week or a replay never counts
// twice. Only the latest `retainWeeks` weeks are kept per location and lead. `adjusted` must be the sensed value
// even while the self-check's fallback publishes the baseline (a shadow score), or the fallback could never end.

import { NearcastError } from '../errors.ts';
import { ACCURACY_SCHEMA_VERSION, type AccuracySummary } from '../contracts/accuracy-summary.ts';
import { locationId } from '../contracts/ids.ts';
import { isCalendarDate } from '../contracts/primitives.ts';
import { VOLUME_BANDS, volumeBandOf, type VolumeBand } from '../stats/volume-band.ts';
import { addError, biasOf, emptyErrorSums, fva, wapeOf, bandHit, type ErrorSums } from './measures.ts';
import { selfCheckEntry, type SelfCheckEvidence, type SelfCheckState, type WeeklyErrors } from './self-check.ts';

export interface SeriesWeekScore {
  /** For rejection messages only. */
  readonly item: string;
  readonly actual: number;
  /** The baseline of the week as known at this lead; null when there was none (the pair cannot be compared). */
  readonly baseline: number | null;
  /** The sensed plan at this lead. */
  readonly adjusted: number;
  /** The published band, when there was one. */
  readonly p10?: number | null;
  readonly p90?: number | null;
  /** The series' mean demand in units a day, which picks its volume band. */
  readonly meanUnitsPerDay: number;
}

/** Sums of one (location, lead, week, band); plain JSON. */
export interface WeekCell {
  seriesWeeks: number;
  baseline: ErrorSums;
  adjusted: ErrorSums;
  bandSeriesWeeks: number;
  /** Σ band hits (1 inside, ½ on an end). */
  bandHits: number;
}

export type WeekCells = Partial<Record<VolumeBand, WeekCell>>;

export interface ScorecardState {
  readonly version: 1;
  readonly retainWeeks: number;
  /** location → lead → weekStart → band → sums. */
  readonly locations: Readonly<Record<string, Readonly<Record<string, Readonly<Record<string, WeekCells>>>>>>;
}

export interface WeekBatch {
  readonly location: string;
  readonly lead: number;
  readonly weekStart: string;
  readonly series: readonly SeriesWeekScore[];
}

export interface Rejected {
  readonly item: string;
  readonly reason: string;
}

export type { WeeklyErrors };

export const DEFAULT_RETAIN_WEEKS = 26;
export const DEFAULT_WINDOW_WEEKS = 13;

function argError(detail: string): never {
  throw new NearcastError('NEARCAST_STATS_ARGUMENT_INVALID', [detail]);
}

export function emptyScorecard(retainWeeks = DEFAULT_RETAIN_WEEKS): ScorecardState {
  if (!Number.isInteger(retainWeeks) || retainWeeks < 1) argError(`retainWeeks must be an integer ≥ 1 (got ${retainWeeks})`);
  return { version: 1, retainWeeks, locations: {} };
}

function checkKey(location: string, lead: number, week?: string): void {
  if (!locationId.safeParse(location).success) argError(`location "${location}" is not a valid location id`);
  if (!Number.isInteger(lead) || lead < 0) argError(`lead must be an integer ≥ 0 (got ${lead})`);
  if (week !== undefined && !isCalendarDate(week)) argError(`weekStart "${week}" must be a calendar date YYYY-MM-DD`);
}

function validate(s: SeriesWeekScore): string | null {
  const finiteNonNegative = (v: number): boolean => Number.isFinite(v) && v >= 0;
  if (!finiteNonNegative(s.actual)) return `actual must be finite and ≥ 0 (got ${String(s.actual)})`;
  if (s.baseline === null) return 'no baseline for the week at this lead, so it cannot be compared';
  if (!finiteNonNegative(s.baseline)) return `baseline must be finite and ≥ 0 (got ${String(s.baseline)})`;
  if (!finiteNonNegative(s.adjusted)) return `adjusted must be finite and ≥ 0 (got ${String(s.adjusted)})`;
  const hasBand = s.p10 !== undefined && s.p10 !== null && s.p90 !== undefined && s.p90 !== null;
  if (hasBand && !(Number.isFinite(s.p10!) && Number.isFinite(s.p90!) && s.p10! <= s.p90!)) {
    return `band must satisfy p10 ≤ p90 (got ${String(s.p10)}, ${String(s.p90)})`;
  }
  return null;
}

/**
 * Scores one complete week of one location at one lead, replacing any earlier score of the same week. Returns the
 * new state (the input is not changed) and the series left out, each with its reason.
 */
export function recordWeek(state: ScorecardState, batch: WeekBatch): { state: ScorecardState; rejected: Rejected[] } {
  const { location, lead, weekStart } = batch;
  checkKey(location, lead, weekStart);
  const rejected: Rejected[] = [];
  const cells: WeekCells = {};
  for (const s of batch.series) {
    const reason = validate(s);
    if (reason !== null) {
      rejected.push({ item: s.item, reason });
      continue;
    }
    const band = volumeBandOf(s.meanUnitsPerDay);
    const cell = (cells[band] ??= {
      seriesWeeks: 0,
      baseline: emptyErrorSums(),
      adjusted: emptyErrorSums(),
      bandSeriesWeeks: 0,
      bandHits: 0,
    });
    cell.seriesWeeks++;
    addError(cell.baseline, s.baseline!, s.actual);
    addError(cell.adjusted, s.adjusted, s.actual);
    if (s.p10 !== undefined && s.p10 !== null && s.p90 !== undefined && s.p90 !== null) {
      cell.bandSeriesWeeks++;
      cell.bandHits += bandHit(s.p10, s.p90, s.actual);
    }
  }
  const byLead = state.locations[location] ?? {};
  const weeks: Record<string, WeekCells> = { ...(byLead[String(lead)] ?? {}), [weekStart]: cells };
  const kept = Object.keys(weeks).sort().slice(-state.retainWeeks);
  const pruned: Record<string, WeekCells> = {};
  for (const w of kept) pruned[w] = weeks[w]!;
  return {
    state: { ...state, locations: { ...state.locations, [location]: { ...byLead, [String(lead)]: pruned } } },
    rejected,
  };
}

/** Leads scored for a location, ascending. */
export function scoredLeads(state: ScorecardState, location: string): number[] {
  return Object.keys(state.locations[location] ?? {})
    .map(Number)
    .sort((a, b) => a - b);
}

function weeksUpTo(state: ScorecardState, location: string, lead: number, throughWeek: string, windowWeeks: number): string[] {
  const weeks = state.locations[location]?.[String(lead)] ?? {};
  return Object.keys(weeks)
    .filter((w) => w <= throughWeek)
    .sort()
    .slice(-windowWeeks);
}

/** Per-week totals over all bands for the latest `windowWeeks` weeks up to `throughWeek`, oldest first. */
export function weeklyErrors(
  state: ScorecardState,
  location: string,
  lead: number,
  throughWeek: string,
  windowWeeks = DEFAULT_WINDOW_WEEKS,
): WeeklyErrors[] {
  checkKey(location, lead, throughWeek);
  const weeks = state.locations[location]?.[String(lead)] ?? {};
  return weeksUpTo(state, location, lead, throughWeek, windowWeeks).map((weekStart) => {
    let seriesWeeks = 0;
    let actual = 0;
    let absErrorBaseline = 0;
    let absErrorAdjusted = 0;
    for (const cell of Object.values(weeks[weekStart]!)) {
      seriesWeeks += cell.seriesWeeks;
      actual += cell.baseline.actual;
      absErrorBaseline += cell.baseline.absError;
      absErrorAdjusted += cell.adjusted.absError;
    }
    return { weekStart, seriesWeeks, actual, absErrorBaseline, absErrorAdjusted };
  });
}

interface Totals {
  weeks: number;
  cell: WeekCell;
}

function mergeInto(into: WeekCell, c: WeekCell): void {
  into.seriesWeeks += c.seriesWeeks;
  into.bandSeriesWeeks += c.bandSeriesWeeks;
  into.bandHits += c.bandHits;
  for (const k of ['baseline', 'adjusted'] as const) {
    into[k].absError += c[k].absError;
    into[k].error += c[k].error;
    into[k].actual += c[k].actual;
  }
}

function emptyCell(): WeekCell {
  return { seriesWeeks: 0, baseline: emptyErrorSums(), adjusted: emptyErrorSums(), bandSeriesWeeks: 0, bandHits: 0 };
}

export interface SummaryOptions {
  readonly location: string;
  readonly throughWeek: string;
  readonly windowWeeks?: number;
  /** The self-check state, for each lead's fallback flag and evidence. */
  readonly selfCheck?: SelfCheckState;
}

/**
 * Accuracy summaries for every scored lead of a location: one record per volume band that has scores in the
 * window, plus one for 'all' bands. Records come sorted by lead, then band order, 'all' last.
 */
export function summarise(state: ScorecardState, options: SummaryOptions): AccuracySummary[] {
  const { location, throughWeek } = options;
  const windowWeeks = options.windowWeeks ?? DEFAULT_WINDOW_WEEKS;
  if (!Number.isInteger(windowWeeks) || windowWeeks < 1) argError(`windowWeeks must be an integer ≥ 1 (got ${windowWeeks})`);
  checkKey(location, 0, throughWeek);
  const out: AccuracySummary[] = [];
  for (const lead of scoredLeads(state, location)) {
    const weeks = state.locations[location]![String(lead)]!;
    const window = weeksUpTo(state, location, lead, throughWeek, windowWeeks);
    if (window.length === 0) continue;
    const perBand = new Map<VolumeBand | 'all', Totals>();
    for (const w of window) {
      let any = false;
      for (const band of VOLUME_BANDS) {
        const c = weeks[w]![band];
        if (c === undefined || c.seriesWeeks === 0) continue;
        any = true;
        const t = perBand.get(band) ?? { weeks: 0, cell: emptyCell() };
        t.weeks++;
        mergeInto(t.cell, c);
        perBand.set(band, t);
      }
      if (any) {
        const all = perBand.get('all') ?? { weeks: 0, cell: emptyCell() };
        all.weeks++;
        for (const c of Object.values(weeks[w]!)) mergeInto(all.cell, c);
        perBand.set('all', all);
      }
    }
    const entry = options.selfCheck === undefined ? undefined : selfCheckEntry(options.selfCheck, location, lead);
    const evidence: SelfCheckEvidence | null = entry?.evidence ?? null;
    for (const band of [...VOLUME_BANDS, 'all'] as const) {
      const t = perBand.get(band);
      if (t === undefined) continue;
      const wb = wapeOf(t.cell.baseline);
      const wa = wapeOf(t.cell.adjusted);
      out.push({
        schemaVersion: ACCURACY_SCHEMA_VERSION,
        location: locationId.parse(location),
        lead,
        volumeBand: band,
        throughWeek,
        windowWeeks,
        weeksScored: t.weeks,
        seriesWeeks: t.cell.seriesWeeks,
        baseline: { wape: wb, bias: biasOf(t.cell.baseline) },
        adjusted: { wape: wa, bias: biasOf(t.cell.adjusted) },
        fva: fva(wb, wa),
        bandCoverage: t.cell.bandSeriesWeeks > 0 ? t.cell.bandHits / t.cell.bandSeriesWeeks : null,
        bandSeriesWeeks: t.cell.bandSeriesWeeks,
        fallbackActive: entry?.fallbackActive ?? false,
        selfCheck: evidence === null ? null : { ...evidence },
      });
    }
  }
  return out;
}
