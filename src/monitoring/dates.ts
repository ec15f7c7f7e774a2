import { DateTime } from 'luxon';

// Calendar arithmetic on local dates (YYYY-MM-DD) and instants, with no clock: every instant is passed in.

const DAY_MS = 86_400_000;

function utcMs(date: string): number {
  return Date.UTC(Number(date.slice(0, 4)), Number(date.slice(5, 7)) - 1, Number(date.slice(8, 10)));
}

export function addDays(date: string, days: number): string {
  return new Date(utcMs(date) + days * DAY_MS).toISOString().slice(0, 10);
}

/** Calendar days from `from` to `to` (positive when `to` is later). */
export function daysBetween(from: string, to: string): number {
  return Math.round((utcMs(to) - utcMs(from)) / DAY_MS);
}

/** The local date of an instant in a time zone. */
export function localDateOf(ms: number, timeZone: string): string {
  return DateTime.fromMillis(ms, { zone: timeZone }).toISODate() ?? new Date(ms).toISOString().slice(0, 10);
}

/** The instant of a local wall-clock time (HH:MM) on a local date in a time zone. */
export function instantOf(date: string, clock: string, timeZone: string): number {
  return DateTime.fromISO(`${date}T${clock}`, { zone: timeZone }).toMillis();
}
