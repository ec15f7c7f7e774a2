import { DateTime, IANAZone } from 'luxon';
import type { Location } from '../contracts/location.ts';
import { WEEKDAYS } from '../contracts/primitives.ts';

// Local-calendar arithmetic the runtime needs to decide when a location's day ends. Pure functions of their
// arguments (no clock), on luxon so time-zone rules and daylight-saving days are right.

// Zoned look-ups are the hot path of a replay (every record asks for its local date), and luxon's offset lookup
// goes through Intl each time. Offsets are memoised per zone and UTC hour when the offset is the same at both ends
// of the hour (no transition inside it; an hour holding a transition is looked up exactly each time), local instants
// per date; the memo is a pure cache and cannot change a result.
const HOUR_MS = 3_600_000;
const MEMO_LIMIT = 200_000;
const zones = new Map<string, IANAZone>();
const offsets = new Map<string, number>();
const instants = new Map<string, number>();

function remember(map: Map<string, number>, key: string, value: number): number {
  if (map.size >= MEMO_LIMIT) map.clear();
  map.set(key, value);
  return value;
}

/** UTC offset of `timeZone` at `ms`, in minutes. */
export function offsetMinutes(ms: number, timeZone: string): number {
  const hour = Math.floor(ms / HOUR_MS);
  const key = `${timeZone}|${hour}`;
  const hit = offsets.get(key);
  if (hit !== undefined) return hit;
  let zone = zones.get(timeZone);
  if (!zone) zones.set(timeZone, (zone = IANAZone.create(timeZone)));
  const first = zone.offset(hour * HOUR_MS);
  if (zone.offset((hour + 1) * HOUR_MS - 1) !== first) return zone.offset(ms);
  return remember(offsets, key, first);
}

export function localDateOf(ms: number, timeZone: string): string {
  return new Date(ms + offsetMinutes(ms, timeZone) * 60_000).toISOString().slice(0, 10);
}

/** Epoch ms of local midnight starting `date` in `timeZone` (on a DST day luxon picks the valid instant). */
export function startOfLocalDayMs(date: string, timeZone: string): number {
  const key = `${date}|${timeZone}`;
  return instants.get(key) ?? remember(instants, key, DateTime.fromISO(date, { zone: timeZone }).startOf('day').toMillis());
}

/** Epoch ms of local clock time `hhmm` on `date`. */
export function localTimeMs(date: string, hhmm: string, timeZone: string): number {
  const key = `${date}|${hhmm}|${timeZone}`;
  const hit = instants.get(key);
  if (hit !== undefined) return hit;
  const [h, m] = hhmm.split(':').map(Number);
  return remember(instants, key, DateTime.fromISO(date, { zone: timeZone }).set({ hour: h, minute: m, second: 0, millisecond: 0 }).toMillis());
}

const DAY_MS = 86_400_000;

// Date-only arithmetic needs no time zone: plain UTC day counting is exact and much faster than a zoned library call.
export function addDays(date: string, days: number): string {
  return new Date(Date.parse(`${date}T00:00:00Z`) + days * DAY_MS).toISOString().slice(0, 10);
}

export function weekdayOf(date: string): (typeof WEEKDAYS)[number] {
  return WEEKDAYS[(new Date(`${date}T00:00:00Z`).getUTCDay() + 6) % 7]!;
}

/** A business day is open on its weekday and not a closed holiday (a reduced holiday is still a business day). */
export function isBusinessDay(location: Location, date: string): boolean {
  if (location.closedWeekdays?.includes(weekdayOf(date))) return false;
  return !location.holidays?.some((h) => h.date === date && h.kind === 'closed');
}

/** Instant the watermark must pass to close `date`: local midnight ending it plus the grace. */
export function watermarkCloseMs(date: string, timeZone: string, graceMs: number): number {
  return startOfLocalDayMs(addDays(date, 1), timeZone) + graceMs;
}

/** The wall-clock deadline of `date`: its `dayCloseDeadline` local time on the following day. */
export function deadlineMs(date: string, deadline: string, timeZone: string): number {
  return localTimeMs(addDays(date, 1), deadline, timeZone);
}
