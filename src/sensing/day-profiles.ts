import { isoWeekday } from '../calendar/day-number.ts';
import type { RecomputeContext } from './recompute-context.ts';
import type { SeriesFrame } from './series-frame.ts';

// Day-of-week profiles over the complete ordinary weeks of the lookback: the requested-date profile (how a week's
// demand spreads over its days, for the daily split) and the order-intake profile (on which weekdays orders are
// placed, for monitoring). A series' own profile is pulled toward its location's by a week's worth of pseudo-demand.

export type WeekdayProfile = Float64Array; // index 1..7 (ISO weekday), shares summing to 1

export function weekdaySums(daily: Float64Array, ctx: RecomputeContext): Float64Array {
  const sums = new Float64Array(8);
  for (let n = 1; n <= ctx.settings.lookbackWeeks; n++) {
    const p = ctx.H - n;
    if (p < 0 || ctx.holidayLoss[p] !== 0) continue;
    for (let d = 0; d < 7; d++) {
      const di = 7 * p + d;
      const wd = isoWeekday(ctx.firstDay + di);
      sums[wd] = sums[wd]! + daily[di]!;
    }
  }
  return sums;
}

/** Flat profile over the location's open weekdays. */
export function flatProfile(ctx: RecomputeContext): WeekdayProfile {
  const out = new Float64Array(8);
  for (let wd = 1; wd <= 7; wd++) if (!((ctx.cal.closedMask >> wd) & 1)) out[wd] = 1 / ctx.openWeekdays;
  return out;
}

export function shrunkProfile(own: Float64Array, pooled: WeekdayProfile, priorUnits: number): WeekdayProfile {
  let total = 0;
  for (let wd = 1; wd <= 7; wd++) total += own[wd]!;
  const out = new Float64Array(8);
  const denom = total + priorUnits;
  if (!(denom > 0)) return Float64Array.from(pooled);
  for (let wd = 1; wd <= 7; wd++) out[wd] = (own[wd]! + priorUnits * pooled[wd]!) / denom;
  return out;
}

export function normalise(sums: Float64Array, fallback: WeekdayProfile): WeekdayProfile {
  let total = 0;
  for (let wd = 1; wd <= 7; wd++) total += sums[wd]!;
  if (!(total > 0)) return Float64Array.from(fallback);
  return Float64Array.from(sums, (v, i) => (i === 0 ? 0 : v / total));
}

/** Requested-date and intake profiles of one series, given the location's pooled ones. */
export function seriesProfiles(frame: SeriesFrame, ctx: RecomputeContext, pooledDemand: WeekdayProfile, pooledIntake: WeekdayProfile, weeklyLevel: number) {
  const prior = Number.isFinite(weeklyLevel) && weeklyLevel > 0 ? weeklyLevel : 0;
  return {
    demand: shrunkProfile(weekdaySums(frame.dayDemand, ctx), pooledDemand, prior),
    intake: shrunkProfile(weekdaySums(frame.dayIntake, ctx), pooledIntake, prior),
  };
}
