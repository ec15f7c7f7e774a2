import { addDays, isBusinessDay, weekdayOf } from '../runtime/local-day.ts';
import type { DemoCentre, DemoItem } from './catalogue.ts';
import type { Scenario } from './scenario.ts';

// The true expected demand of a series by requested date: a weekly level with a gentle drift into summer, a
// weekday profile over the centre's open days, holidays moving their demand to the neighbouring business days, and
// the heat wave at its centre.

const WEEKDAY_WEIGHT: Record<string, number> = { monday: 1.15, tuesday: 1.0, wednesday: 1.0, thursday: 1.05, friday: 1.2, saturday: 0.7, sunday: 0.4 };

export function daysBetween(a: string, b: string): number {
  return Math.round((Date.parse(`${b}T00:00:00Z`) - Date.parse(`${a}T00:00:00Z`)) / 86_400_000);
}

/** Weekday share of a normal week at the centre (open weekdays only, summing to 1). */
export function weekdayShare(centre: DemoCentre, date: string): number {
  const closed = new Set(centre.master.closedWeekdays ?? []);
  const open = Object.keys(WEEKDAY_WEIGHT).filter((d) => !closed.has(d as never));
  const total = open.reduce((t, d) => t + WEEKDAY_WEIGHT[d]!, 0);
  const wd = weekdayOf(date);
  return closed.has(wd) ? 0 : WEEKDAY_WEIGHT[wd]! / total;
}

/** Lift of the heat wave on `date` for an item (1 = none). */
export function heatLift(scenario: Scenario, centre: DemoCentre, item: DemoItem, date: string): number {
  const hw = scenario.heatWave;
  if (centre.master.location !== hw.location || date < hw.from) return 1;
  const ramp = Math.min(1, (daysBetween(hw.from, date) + 1) / hw.rampDays);
  return 1 + hw.lift * item.heat * ramp;
}

/** Slow seasonal drift: weather-sensitive items gain up to 20 % between April and late July. */
export function seasonLift(scenario: Scenario, item: DemoItem, date: string): number {
  const t = Math.max(0, daysBetween(scenario.start, date)) / (scenario.weeks * 7);
  return 1 + 0.2 * item.heat * Math.min(1.4, t);
}

/**
 * Expected units requested for `date`. A closed holiday has none; half of its normal share goes to the business day
 * before and half to the one after (customers order around it).
 */
export function expectedDemand(scenario: Scenario, centre: DemoCentre, item: DemoItem, level: number, date: string): number {
  const master = centre.master;
  if (!isBusinessDay(master, date)) return 0;
  let share = weekdayShare(centre, date);
  for (const step of [-1, 1]) {
    // The neighbouring non-business days that are holidays hand over half their share.
    let d = addDays(date, step);
    for (let i = 0; i < 3 && !isBusinessDay(master, d); i++, d = addDays(d, step)) {
      if (master.holidays?.some((h) => h.date === d)) share += weekdayShare(centre, d) / 2;
    }
  }
  return level * share * seasonLift(scenario, item, date) * heatLift(scenario, centre, item, date);
}
