import { describe, expect, it } from 'vitest';
import { addDays, deadlineMs, isBusinessDay, localDateOf, startOfLocalDayMs, watermarkCloseMs, weekdayOf } from '../../../src/runtime/local-day.ts';

describe('local-day arithmetic', () => {
  it('finds the local date across the spring daylight-saving change in Berlin', () => {
    // 2026-03-29: clocks go from 02:00 CET to 03:00 CEST at 01:00Z (EU rule: last Sunday of March, recalled from memory).
    expect(localDateOf(Date.parse('2026-03-28T22:59:59Z'), 'Europe/Berlin')).toBe('2026-03-28');
    expect(localDateOf(Date.parse('2026-03-28T23:00:00Z'), 'Europe/Berlin')).toBe('2026-03-29');
    expect(localDateOf(Date.parse('2026-03-29T21:59:59Z'), 'Europe/Berlin')).toBe('2026-03-29');
    expect(localDateOf(Date.parse('2026-03-29T22:00:00Z'), 'Europe/Berlin')).toBe('2026-03-30');
  });

  it('puts local midnight and the close instant at the right UTC time on both sides of the change', () => {
    expect(startOfLocalDayMs('2026-03-29', 'Europe/Berlin')).toBe(Date.parse('2026-03-28T23:00:00Z'));
    expect(startOfLocalDayMs('2026-03-30', 'Europe/Berlin')).toBe(Date.parse('2026-03-29T22:00:00Z'));
    // The 23-hour day 03-29 closes at local midnight ending it (22:00Z) plus a 30-minute grace.
    expect(watermarkCloseMs('2026-03-29', 'Europe/Berlin', 30 * 60_000)).toBe(Date.parse('2026-03-29T22:30:00Z'));
    expect(deadlineMs('2026-03-28', '02:00', 'Europe/Berlin')).toBe(Date.parse('2026-03-29T01:00:00Z'));
  });

  it('counts days and weekdays without a time zone', () => {
    expect(addDays('2026-02-27', 2)).toBe('2026-03-01');
    expect(addDays('2028-03-01', -1)).toBe('2028-02-29');
    expect(weekdayOf('2026-03-02')).toBe('monday');
    expect(weekdayOf('2026-03-08')).toBe('sunday');
  });

  it('treats closed weekdays and closed holidays as non-business days, reduced holidays as business days', () => {
    const loc = { location: 'DC' as never, timeZone: 'UTC', closedWeekdays: ['sunday' as const], holidays: [{ date: '2026-05-01', kind: 'closed' as const }, { date: '2026-05-04', kind: 'reduced' as const }] };
    expect(isBusinessDay(loc, '2026-05-01')).toBe(false);
    expect(isBusinessDay(loc, '2026-05-03')).toBe(false);
    expect(isBusinessDay(loc, '2026-05-04')).toBe(true);
    expect(isBusinessDay(loc, '2026-05-02')).toBe(true);
  });
});
