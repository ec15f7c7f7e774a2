import { formatDay, isoWeekday } from '../calendar/day-number.ts';
import { dayCapacity } from '../calendar/location-calendar.ts';
import type { RecomputeContext } from './recompute-context.ts';
import type { WeekdayProfile } from './day-profiles.ts';

/**
 * Splits a week's adjusted quantity into days: days up to the plan date keep their actuals; later days get what is
 * already booked on them plus the unbooked remainder spread by the requested-date profile and each day's capacity
 * (closed 0, reduced holiday a share). If the remainder is below what is booked, the booked days are scaled.
 */
export function dailySplit(
  adjusted: number,
  weekDay: number,
  daily: Float64Array,
  profile: WeekdayProfile,
  ctx: RecomputeContext,
): Array<{ date: string; quantity: number }> {
  const out: Array<{ date: string; quantity: number }> = [];
  const qty = new Float64Array(7);
  let past = 0;
  let booked = 0;
  let weights = 0;
  const w = new Float64Array(7);
  for (let d = 0; d < 7; d++) {
    const day = weekDay + d;
    const di = day - ctx.firstDay;
    const v = di >= 0 && di < ctx.nDays ? daily[di]! : 0;
    if (day <= ctx.planDay) {
      qty[d] = v;
      past += v;
    } else {
      booked += v;
      w[d] = profile[isoWeekday(day)]! * dayCapacity(ctx.cal, day, ctx.settings.reducedDayShare);
      weights += w[d]!;
    }
  }
  const remaining = Math.max(0, adjusted - past);
  for (let d = 0; d < 7; d++) {
    const day = weekDay + d;
    if (day <= ctx.planDay) continue;
    const di = day - ctx.firstDay;
    const v = di >= 0 && di < ctx.nDays ? daily[di]! : 0;
    if (remaining >= booked) {
      const extra = remaining - booked;
      qty[d] = v + (weights > 0 ? (extra * w[d]!) / weights : 0);
    } else {
      qty[d] = booked > 0 ? (v * remaining) / booked : 0;
    }
  }
  // Nowhere left to put an unbooked remainder (every later day closed): it stays on the last day of the week.
  if (weights === 0 && remaining > booked) qty[6] = qty[6]! + remaining - booked;
  for (let d = 0; d < 7; d++) out.push({ date: formatDay(weekDay + d), quantity: qty[d]! });
  return out;
}
