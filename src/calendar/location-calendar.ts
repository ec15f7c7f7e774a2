import { DateTime, IANAZone } from 'luxon';
import type { Location } from '../contracts/location.ts';
import { WEEKDAYS, type Weekday } from '../contracts/primitives.ts';
import { NearcastError } from '../errors.ts';
import { calendarParts, dayNumber, DAY_MILLISECONDS, formatDay, isoWeekday } from './day-number.ts';
import { weekStartOf } from './weeks.ts';

/** How a date is treated at a location. */
export type DayKind = 'open' | 'closed-weekday' | 'holiday-closed' | 'holiday-reduced';

/** A location's calendar: its time zone, week start, closed weekdays and holidays. Immutable. */
export interface LocationCalendar {
  readonly location: string;
  readonly timeZone: string;
  /** ISO weekday the week starts on (1 = Monday). */
  readonly weekStart: number;
  /** Bit (1 << isoWeekday) set for each closed weekday. */
  readonly closedMask: number;
  /** Holiday kind by day number. */
  readonly holidays: ReadonlyMap<number, 'closed' | 'reduced'>;
  readonly zone: IANAZone;
}

export function isoWeekdayOfName(name: Weekday): number {
  return WEEKDAYS.indexOf(name) + 1;
}

/** Builds the calendar of a location from its master data; NEARCAST_CALENDAR_INVALID names a bad field. */
export function createLocationCalendar(location: Pick<Location, 'location' | 'timeZone' | 'weekStart' | 'closedWeekdays' | 'holidays'>): LocationCalendar {
  const zone = IANAZone.create(location.timeZone);
  if (!zone.isValid) throw new NearcastError('NEARCAST_CALENDAR_INVALID', [`timeZone: ${location.timeZone} is not an IANA time zone`]);
  let closedMask = 0;
  for (const wd of location.closedWeekdays ?? []) closedMask |= 1 << isoWeekdayOfName(wd);
  if (closedMask === 0b11111110) throw new NearcastError('NEARCAST_CALENDAR_INVALID', ['closedWeekdays: must leave at least one open weekday']);
  const holidays = new Map<number, 'closed' | 'reduced'>();
  for (const h of location.holidays ?? []) {
    const day = dayNumber(h.date);
    // A day listed twice keeps its stricter kind, so an accidental duplicate never reopens a closed day.
    if (holidays.get(day) !== 'closed') holidays.set(day, h.kind);
  }
  return Object.freeze({
    location: location.location,
    timeZone: location.timeZone,
    weekStart: location.weekStart ? isoWeekdayOfName(location.weekStart) : 1,
    closedMask,
    holidays,
    zone,
  });
}

// Offsets change only on quarter-hour boundaries (every transition in the IANA database since 1980 is on one), so
// an offset looked up once holds for its whole quarter hour; asking the zone is slow (Intl formatting).
const QUARTER_HOUR = 900_000;
const offsetCache = new WeakMap<IANAZone, Map<number, number>>();

/** UTC offset of the zone at an instant, in minutes. */
export function zoneOffsetMinutes(cal: LocationCalendar, epochMs: number): number {
  let cache = offsetCache.get(cal.zone);
  if (!cache) {
    cache = new Map();
    offsetCache.set(cal.zone, cache);
  }
  const bucket = Math.floor(epochMs / QUARTER_HOUR);
  let off = cache.get(bucket);
  if (off === undefined) {
    off = cal.zone.offset(bucket * QUARTER_HOUR);
    if (cache.size > 200_000) cache.clear();
    cache.set(bucket, off);
  }
  return off;
}

/** Local date (day number) of an instant at the location, honouring daylight-saving changes. */
export function localDayOf(cal: LocationCalendar, epochMs: number): number {
  return Math.floor((epochMs + zoneOffsetMinutes(cal, epochMs) * 60_000) / DAY_MILLISECONDS);
}

/** Instant at which the local day starts (local midnight, or the first valid instant after a gap). */
export function startOfLocalDay(cal: LocationCalendar, day: number): number {
  const p = calendarParts(day);
  return DateTime.fromObject({ year: p.year, month: p.month, day: p.day }, { zone: cal.zone }).startOf('day').toMillis();
}

/** Instant at which the local day ends (the next day's start), exclusive. */
export function endOfLocalDay(cal: LocationCalendar, day: number): number {
  return startOfLocalDay(cal, day + 1);
}

export function dayKind(cal: LocationCalendar, day: number): DayKind {
  const h = cal.holidays.get(day);
  if (h === 'closed') return 'holiday-closed';
  if ((cal.closedMask >> isoWeekday(day)) & 1) return 'closed-weekday';
  if (h === 'reduced') return 'holiday-reduced';
  return 'open';
}

/** A business day is a local date that is neither a closed weekday nor a closed holiday (reduced days count). */
export function isBusinessDay(cal: LocationCalendar, day: number): boolean {
  const k = dayKind(cal, day);
  return k === 'open' || k === 'holiday-reduced';
}

/** Weekdays the location is normally open on (ignoring holidays). */
export function openWeekdayCount(cal: LocationCalendar): number {
  let n = 0;
  for (let wd = 1; wd <= 7; wd++) if (!((cal.closedMask >> wd) & 1)) n++;
  return n;
}

/** Start day of the location's week holding `day`. */
export function locationWeekStart(cal: LocationCalendar, day: number): number {
  return weekStartOf(day, cal.weekStart);
}

/** Week key (start date, `YYYY-MM-DD`) of a local date at the location. */
export function weekOfDate(cal: LocationCalendar, date: string): string {
  return formatDay(weekStartOf(dayNumber(date), cal.weekStart));
}

/** Business days of the week starting `weekStartDay`. */
export function businessDaysOfWeek(cal: LocationCalendar, weekStartDay: number): number[] {
  const out: number[] = [];
  for (let d = weekStartDay; d < weekStartDay + 7; d++) if (isBusinessDay(cal, d)) out.push(d);
  return out;
}

/**
 * Capacity of a day relative to a normal open day: 0 when closed, `reducedShare` on a reduced holiday, 1 otherwise.
 */
export function dayCapacity(cal: LocationCalendar, day: number, reducedShare: number): number {
  const k = dayKind(cal, day);
  if (k === 'open') return 1;
  if (k === 'holiday-reduced') return reducedShare;
  return 0;
}

/**
 * Share of a week's normal open days lost to holidays (0 for an ordinary week), counted on a flat profile over
 * the open weekdays so it depends only on the calendar, never on demand data.
 */
export function holidayLoss(cal: LocationCalendar, weekStartDay: number, reducedShare: number): number {
  let lost = 0;
  let open = 0;
  for (let d = weekStartDay; d < weekStartDay + 7; d++) {
    if ((cal.closedMask >> isoWeekday(d)) & 1) continue;
    open++;
    lost += 1 - dayCapacity(cal, d, reducedShare);
  }
  return open === 0 ? 0 : lost / open;
}
