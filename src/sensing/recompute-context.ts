import { dayNumber } from '../calendar/day-number.ts';
import { endOfLocalDay, holidayLoss, openWeekdayCount, type LocationCalendar } from '../calendar/location-calendar.ts';
import { dayInWeek, weekStartOf } from '../calendar/weeks.ts';
import { parseTimestamp } from '../contracts/primitives.ts';
import { NearcastError } from '../errors.ts';
import type { SensingSettings } from './settings.ts';

/** The as-of moment of a recompute: the plan date and the instant up to which records count. */
export interface AsOf {
  /** Local date of the close being planned (`YYYY-MM-DD`). */
  readonly planDate: string;
  /** Knowledge instant (RFC 3339 or epoch ms); records known later are ignored. Usually the close instant. */
  readonly knownAt: string | number;
}

/**
 * Fixed geometry of one recompute. Weeks are indexed relative to the plan date's week (0 = current, −n = n weeks
 * ago); week i has NC knowledge cut-points, all on the plan date's weekday: cut j is the day W_i + k + 7(j − maxLead),
 * so cut maxLead − L is "the same point in the cycle L weeks before", cut maxLead + m is m weeks after. Index NC
 * holds everything known by the as-of instant.
 */
export interface RecomputeContext {
  readonly settings: SensingSettings;
  readonly cal: LocationCalendar;
  readonly planDay: number;
  /** Position of the plan date in its week (0 … 6). */
  readonly k: number;
  readonly week0: number;
  readonly cutoffMs: number;
  /** Weeks of history in the frame: indexes −H … maxLead. */
  readonly H: number;
  /** Longest feature window (weeks). */
  readonly M: number;
  readonly NC: number;
  readonly nWeeks: number;
  /** Oldest as-of index used by a training row (as-of j is the plan date minus 7j days). */
  readonly J: number;
  readonly firstDay: number;
  readonly nDays: number;
  readonly openWeekdays: number;
  /** Share of each frame week lost to holidays (flat over open weekdays), by frame position. */
  readonly holidayLoss: Float64Array;
  /** Recency weights by age in weeks: recent-ratio half-life, and the training/build-up half-life. */
  readonly recentWeight: Float64Array;
  readonly halfLifeWeight: Float64Array;
}

export function recomputeContext(cal: LocationCalendar, asOf: AsOf, settings: SensingSettings): RecomputeContext {
  let planDay: number;
  try {
    planDay = dayNumber(asOf.planDate);
  } catch {
    throw new NearcastError('NEARCAST_CALENDAR_INVALID', [`planDate must be a real date written YYYY-MM-DD`]);
  }
  const knownMs = typeof asOf.knownAt === 'number' ? asOf.knownAt : parseTimestamp(asOf.knownAt);
  if (knownMs === undefined || !Number.isFinite(knownMs)) {
    throw new NearcastError('NEARCAST_CALENDAR_INVALID', ['knownAt must be an RFC 3339 timestamp or epoch milliseconds']);
  }
  // Daily resolution: the as-of moment never reaches past the end of the plan date, so training rows (cut at the
  // end of their as-of day) and live features are computed by the same rule.
  const cutoffMs = Math.min(knownMs, endOfLocalDay(cal, planDay) - 1);
  const M = Math.max(settings.recentWeeks, settings.bookProfileWeeks, settings.smallSeriesWeeks, settings.runRateWeeks);
  const J = settings.lookbackWeeks + settings.maxLead;
  const H = J + M;
  const nWeeks = H + settings.maxLead + 1;
  const week0 = weekStartOf(planDay, cal.weekStart);
  const firstDay = week0 - 7 * H;
  const loss = new Float64Array(nWeeks);
  for (let p = 0; p < nWeeks; p++) loss[p] = holidayLoss(cal, firstDay + 7 * p, settings.reducedDayShare);
  return {
    settings,
    cal,
    planDay,
    k: dayInWeek(planDay, cal.weekStart),
    week0,
    cutoffMs,
    H,
    M,
    NC: settings.maxLead + 1 + M,
    nWeeks,
    J,
    firstDay,
    nDays: 7 * nWeeks,
    openWeekdays: openWeekdayCount(cal),
    holidayLoss: loss,
    recentWeight: Float64Array.from({ length: M + 2 }, (_, a) => 0.5 ** (a / settings.recentHalfLifeWeeks)),
    halfLifeWeight: Float64Array.from({ length: Math.max(M, settings.lookbackWeeks) + 2 }, (_, a) => 0.5 ** (a / settings.halfLifeWeeks)),
  };
}

/** Frame position of week index i (0 = the plan date's week). */
export function pos(ctx: RecomputeContext, weekIndex: number): number {
  return weekIndex + ctx.H;
}

/** Start day of week index i. */
export function weekDayOf(ctx: RecomputeContext, weekIndex: number): number {
  return ctx.week0 + 7 * weekIndex;
}
