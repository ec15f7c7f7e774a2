import { NearcastError } from '../errors.ts';

// Local calendar dates travel as integer day numbers (days since 1970-01-01 in the proleptic Gregorian calendar).
// Arithmetic on them is exact and cheap, which the sensing engine needs for typed columns; a day number carries no
// time zone: it names a date on a location's wall calendar.

const DAY_MS = 86_400_000;
const DATE_PATTERN = /^(\d{4})-(\d{2})-(\d{2})$/;

/** Day number of a `YYYY-MM-DD` date; throws NEARCAST_CALENDAR_INVALID naming the value's problem. */
export function dayNumber(date: string): number {
  const m = DATE_PATTERN.exec(date);
  if (!m) throw new NearcastError('NEARCAST_CALENDAR_INVALID', [`date must be written YYYY-MM-DD`]);
  const y = Number(m[1]);
  const mo = Number(m[2]);
  const d = Number(m[3]);
  const ms = Date.UTC(y, mo - 1, d);
  const check = new Date(ms);
  if (check.getUTCFullYear() !== y || check.getUTCMonth() !== mo - 1 || check.getUTCDate() !== d) {
    throw new NearcastError('NEARCAST_CALENDAR_INVALID', [`date ${date} is not a real calendar date`]);
  }
  return Math.round(ms / DAY_MS);
}

// Plans write the same few dozen dates for every series of a location: formatting through Date each time showed
// in the recompute profile. Bounded, so a long-running process cannot grow it without limit.
const formatted = new Map<number, string>();
const FORMATTED_MAX = 4096;

/** `YYYY-MM-DD` of a day number. */
export function formatDay(day: number): string {
  let text = formatted.get(day);
  if (text === undefined) {
    text = new Date(day * DAY_MS).toISOString().slice(0, 10);
    if (formatted.size >= FORMATTED_MAX) formatted.clear();
    formatted.set(day, text);
  }
  return text;
}

/** ISO 8601 weekday of a day number: 1 = Monday … 7 = Sunday (1970-01-01 was a Thursday). */
export function isoWeekday(day: number): number {
  return ((((day + 3) % 7) + 7) % 7) + 1;
}

/** Calendar year, month (1-12) and day of month of a day number. */
export function calendarParts(day: number): { year: number; month: number; day: number } {
  const d = new Date(day * DAY_MS);
  return { year: d.getUTCFullYear(), month: d.getUTCMonth() + 1, day: d.getUTCDate() };
}

export const DAY_MILLISECONDS = DAY_MS;
