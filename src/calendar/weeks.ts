import { isoWeekday } from './day-number.ts';

// Weeks are keyed by their start date. A week start is an ISO weekday (1 = Monday … 7 = Sunday); ISO 8601 weeks
// start on Monday. Because the key is a date, week 53 and fiscal calendars need no special case.

/** Start day of the week holding `day`, for weeks starting on ISO weekday `weekStart`. */
export function weekStartOf(day: number, weekStart: number): number {
  const back = (isoWeekday(day) - weekStart + 7) % 7;
  return day - back;
}

/** Position of `day` inside its week: 0 on the week's first day … 6 on its last. */
export function dayInWeek(day: number, weekStart: number): number {
  return (isoWeekday(day) - weekStart + 7) % 7;
}

/** Whether `day` is the first day of a week. */
export function isWeekStart(day: number, weekStart: number): boolean {
  return dayInWeek(day, weekStart) === 0;
}

/**
 * Lead of the week starting `weekStartDay` seen from the as-of day: 0 for the as-of day's own week, 1 for the
 * next, negative for past weeks. `weekStartDay` must itself be a week start.
 */
export function leadOfWeek(weekStartDay: number, asOfDay: number, weekStart: number): number {
  return Math.round((weekStartDay - weekStartOf(asOfDay, weekStart)) / 7);
}

/** Start of the week `lead` weeks after the as-of day's week. */
export function weekAtLead(asOfDay: number, lead: number, weekStart: number): number {
  return weekStartOf(asOfDay, weekStart) + 7 * lead;
}
