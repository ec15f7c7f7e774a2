import { describe, expect, it } from 'vitest';
import { dayNumber, formatDay } from '../../../src/calendar/day-number.ts';
import {
  businessDaysOfWeek,
  createLocationCalendar,
  dayKind,
  holidayLoss,
  isBusinessDay,
  localDayOf,
  locationWeekStart,
  startOfLocalDay,
  weekOfDate,
} from '../../../src/calendar/location-calendar.ts';
import type { Location } from '../../../src/contracts/location.ts';

const loc = (extra: Partial<Location> = {}) =>
  createLocationCalendar({ location: 'DC-NORTH' as Location['location'], timeZone: 'Europe/Berlin', ...extra });
const t = (iso: string) => Date.parse(iso);
const HOUR = 3_600_000;

describe('a location calendar', () => {
  it('puts an instant on the local date of the location across the spring daylight-saving change', () => {
    // Europe/Berlin moves from UTC+1 to UTC+2 at 01:00 UTC on Sunday 2026-03-29 (last Sunday of March, EU rule).
    const cal = loc();
    expect(formatDay(localDayOf(cal, t('2026-03-28T23:30:00Z')))).toBe('2026-03-29'); // 00:30 CET
    expect(formatDay(localDayOf(cal, t('2026-03-29T21:59:00Z')))).toBe('2026-03-29'); // 23:59 CEST
    // 22:30 UTC is 00:30 CEST on the 30th; a fixed +1 offset would have said 23:30 on the 29th.
    expect(formatDay(localDayOf(cal, t('2026-03-29T22:30:00Z')))).toBe('2026-03-30');
  });

  it('knows that the spring-change day has 23 hours and the autumn-change day 25', () => {
    const cal = loc();
    const day = dayNumber('2026-03-29');
    expect(startOfLocalDay(cal, day + 1) - startOfLocalDay(cal, day)).toBe(23 * HOUR);
    const autumn = dayNumber('2026-10-25'); // last Sunday of October 2026
    expect(startOfLocalDay(cal, autumn + 1) - startOfLocalDay(cal, autumn)).toBe(25 * HOUR);
    expect(startOfLocalDay(cal, day)).toBe(t('2026-03-28T23:00:00Z'));
  });

  it('handles a half-hour offset zone (Asia/Kolkata, UTC+05:30)', () => {
    const cal = loc({ timeZone: 'Asia/Kolkata' });
    expect(formatDay(localDayOf(cal, t('2026-06-30T18:45:00Z')))).toBe('2026-07-01'); // 00:15 local
    expect(formatDay(localDayOf(cal, t('2026-06-30T18:15:00Z')))).toBe('2026-06-30'); // 23:45 local
  });

  it('keeps weeks on the location week start, ISO Monday unless it says otherwise', () => {
    expect(weekOfDate(loc(), '2027-01-01')).toBe('2026-12-28');
    expect(weekOfDate(loc({ weekStart: 'sunday' }), '2027-01-01')).toBe('2026-12-27');
    expect(formatDay(locationWeekStart(loc({ weekStart: 'saturday' }), dayNumber('2027-01-01')))).toBe('2026-12-26');
  });

  it('treats closed weekdays and closed holidays as non-business days and reduced holidays as business days', () => {
    const cal = loc({
      closedWeekdays: ['saturday', 'sunday'],
      holidays: [
        { date: '2026-12-24', kind: 'reduced' },
        { date: '2026-12-25', kind: 'closed' },
      ],
    });
    const week = dayNumber('2026-12-21');
    expect(businessDaysOfWeek(cal, week).map(formatDay)).toEqual(['2026-12-21', '2026-12-22', '2026-12-23', '2026-12-24']);
    expect(dayKind(cal, dayNumber('2026-12-24'))).toBe('holiday-reduced');
    expect(dayKind(cal, dayNumber('2026-12-25'))).toBe('holiday-closed');
    expect(dayKind(cal, dayNumber('2026-12-26'))).toBe('closed-weekday');
    expect(isBusinessDay(cal, dayNumber('2026-12-24'))).toBe(true);
    // Five open weekdays; Friday lost entirely and Thursday half: (1 + 0.5) / 5.
    expect(holidayLoss(cal, week, 0.5)).toBeCloseTo(0.3, 12);
    expect(holidayLoss(cal, week + 7, 0.5)).toBe(0);
  });

  it('refuses a calendar with every weekday closed', () => {
    expect(() =>
      loc({ closedWeekdays: ['monday', 'tuesday', 'wednesday', 'thursday', 'friday', 'saturday', 'sunday'] as Location['closedWeekdays'] }),
    ).toThrow(/at least one open weekday/);
  });
});
