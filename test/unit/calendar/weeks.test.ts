import { describe, expect, it } from 'vitest';
import { dayNumber, formatDay, isoWeekday } from '../../../src/calendar/day-number.ts';
import { dayInWeek, leadOfWeek, weekAtLead, weekStartOf } from '../../../src/calendar/weeks.ts';

const d = dayNumber;

describe('weeks keyed by their start date', () => {
  it('knows the weekday of a date (1970-01-01 was a Thursday; 2026-12-28 is a Monday)', () => {
    expect(isoWeekday(0)).toBe(4);
    expect(isoWeekday(d('2026-12-28'))).toBe(1);
    expect(isoWeekday(d('2027-01-03'))).toBe(7);
  });

  it('finds the Monday that starts an ISO week, across the turn of the year', () => {
    expect(formatDay(weekStartOf(d('2027-01-01'), 1))).toBe('2026-12-28');
    expect(formatDay(weekStartOf(d('2026-12-28'), 1))).toBe('2026-12-28');
    expect(formatDay(weekStartOf(d('2027-01-03'), 1))).toBe('2026-12-28');
  });

  it('honours a configured week start such as Sunday or Saturday', () => {
    expect(formatDay(weekStartOf(d('2027-01-01'), 7))).toBe('2026-12-27');
    expect(formatDay(weekStartOf(d('2027-01-01'), 6))).toBe('2026-12-26');
    expect(dayInWeek(d('2027-01-01'), 7)).toBe(5); // Sunday, Monday, … Friday is the sixth day
  });

  it('counts the lead of a week from the as-of day', () => {
    const asOf = d('2026-12-30'); // a Wednesday in 2026-W53
    expect(leadOfWeek(d('2026-12-28'), asOf, 1)).toBe(0);
    expect(leadOfWeek(d('2027-01-04'), asOf, 1)).toBe(1);
    expect(leadOfWeek(d('2027-01-25'), asOf, 1)).toBe(4);
    expect(leadOfWeek(d('2026-12-21'), asOf, 1)).toBe(-1);
    expect(formatDay(weekAtLead(asOf, 4, 1))).toBe('2027-01-25');
  });
});
