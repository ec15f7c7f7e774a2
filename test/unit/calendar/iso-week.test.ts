import { describe, expect, it } from 'vitest';
import { dayNumber, formatDay } from '../../../src/calendar/day-number.ts';
import { formatIsoWeekDate, isoWeekDate, isoWeeksInYear } from '../../../src/calendar/iso-week.ts';

const iso = (date: string) => formatIsoWeekDate(isoWeekDate(dayNumber(date)));

describe('ISO 8601 week dates', () => {
  // Worked examples of ISO 8601 week dates at year boundaries (the two named in issue 3; the rest recalled from
  // memory and re-derived by hand: week 1 is the week holding the year's first Thursday).
  it.each([
    ['2008-12-29', '2009-W01-1'], // the example: Monday of the week holding Thu 2009-01-01
    ['2010-01-03', '2009-W53-7'], // the example: 2009 began on a Thursday, so it has 53 weeks
    ['2008-12-28', '2008-W52-7'],
    ['2005-01-01', '2004-W53-6'], // 2004 began on a Thursday
    ['2007-01-01', '2007-W01-1'], // 2007 began on a Monday
    ['2009-12-31', '2009-W53-4'],
  ])('puts %s in %s', (date, expected) => {
    expect(iso(date)).toBe(expected);
  });

  it('gives 2026 a week 53 that runs from Monday 2026-12-28 to Sunday 2027-01-03', () => {
    // 2026-01-01 is a Thursday (2025-01-01 was a Wednesday, plus 365 days), so 2026 has 53 ISO weeks.
    expect(isoWeeksInYear(2026)).toBe(53);
    expect(isoWeeksInYear(2025)).toBe(52);
    expect(iso('2026-12-28')).toBe('2026-W53-1');
    expect(iso('2027-01-03')).toBe('2026-W53-7');
    expect(iso('2027-01-04')).toBe('2027-W01-1');
  });

  it('round-trips day numbers and dates across the year boundary', () => {
    for (const d of ['2026-12-31', '2027-01-01', '2024-02-29', '2000-03-01']) expect(formatDay(dayNumber(d))).toBe(d);
    expect(dayNumber('2027-01-01') - dayNumber('2026-12-31')).toBe(1);
    expect(dayNumber('1970-01-01')).toBe(0);
  });

  it('refuses a date that is not on the calendar, naming it', () => {
    expect(() => dayNumber('2026-02-29')).toThrow(/2026-02-29 is not a real calendar date/);
    expect(() => dayNumber('29.02.2024')).toThrow(/YYYY-MM-DD/);
  });
});
