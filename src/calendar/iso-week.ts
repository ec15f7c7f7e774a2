import { DateTime } from 'luxon';
import { formatDay } from './day-number.ts';

export interface IsoWeekDate {
  /** The ISO week-numbering year, which differs from the calendar year around 1 January. */
  readonly weekYear: number;
  readonly week: number;
  /** 1 = Monday … 7 = Sunday. */
  readonly weekday: number;
}

/** ISO 8601 week date of a day number (week 1 is the week holding the year's first Thursday). */
export function isoWeekDate(day: number): IsoWeekDate {
  const dt = DateTime.fromISO(formatDay(day), { zone: 'utc' });
  return { weekYear: dt.weekYear, week: dt.weekNumber, weekday: dt.weekday };
}

/** The usual written form, e.g. `2009-W01-1`. */
export function formatIsoWeekDate(w: IsoWeekDate): string {
  return `${w.weekYear}-W${String(w.week).padStart(2, '0')}-${w.weekday}`;
}

/** Number of ISO weeks in a week-numbering year (52 or 53). */
export function isoWeeksInYear(weekYear: number): number {
  return DateTime.fromObject({ weekYear, weekNumber: 1 }, { zone: 'utc' }).weeksInWeekYear;
}
