import { describe, expect, it } from 'vitest';
import type { Location } from '../../../src/contracts/location.ts';
import { clockRecordsDue, nextCheckAfter, startCursor } from '../../../src/runtime/clock-records.ts';
import { DEFAULT_STAGE_SETTINGS } from '../../../src/runtime/stage-settings.ts';

const loc = { location: 'DC-NORTH', timeZone: 'Europe/Berlin', closedWeekdays: ['saturday', 'sunday'], businessHours: { open: '07:00', close: '19:00' }, dayCloseDeadline: '02:00' } as unknown as Location;

describe('the clock records', () => {
  it('schedules feed-health checks hourly from opening plus the stall time to closing, on business days only', () => {
    // Friday 2026-03-06 at 18:30 CET: the next check is 19:00, then Monday 10:00 (07:00 + 3 h).
    const fri = Date.parse('2026-03-06T17:30:00Z');
    expect(nextCheckAfter(loc, fri, DEFAULT_STAGE_SETTINGS)).toBe(Date.parse('2026-03-06T18:00:00Z'));
    expect(nextCheckAfter(loc, Date.parse('2026-03-06T18:00:00Z'), DEFAULT_STAGE_SETTINGS)).toBe(Date.parse('2026-03-09T09:00:00Z'));
  });

  it('writes every deadline and check that passed, in time order, and advances the cursor so none repeats', () => {
    const cursors = new Map([['DC-NORTH', startCursor(loc, Date.parse('2026-03-02T09:00:00Z'), DEFAULT_STAGE_SETTINGS)]]);
    const locations = new Map([['DC-NORTH', loc]]);
    const due = clockRecordsDue(Date.parse('2026-03-03T01:00:00Z'), locations, cursors, DEFAULT_STAGE_SETTINGS);
    // Started at 10:00 CET: Monday's checks after it, 11:00..19:00 (9), then Monday's deadline, Tuesday 02:00 CET = 01:00Z.
    expect(due.filter((r) => r.kind === 'feed-health-check')).toHaveLength(9);
    expect(due.at(-1)).toMatchObject({ kind: 'deadline-close', record: { date: '2026-03-02', deadlineMs: Date.parse('2026-03-03T01:00:00Z') } });
    expect(due.map((r) => r.arrivalMs)).toEqual([...due.map((r) => r.arrivalMs)].sort((a, b) => a - b));
    expect(clockRecordsDue(Date.parse('2026-03-03T01:00:00Z'), locations, cursors, DEFAULT_STAGE_SETTINGS)).toEqual([]);
  });

  it('takes a changed deadline from the next record on, even after a cursor was already asked about the old one', () => {
    const cursors = new Map([['DC-NORTH', startCursor(loc, Date.parse('2026-03-02T09:00:00Z'), DEFAULT_STAGE_SETTINGS)]]);
    const deadlines = (locations: Map<string, Location>, at: string) =>
      clockRecordsDue(Date.parse(at), locations, cursors, DEFAULT_STAGE_SETTINGS).filter((r) => r.kind === 'deadline-close');
    expect(deadlines(new Map([['DC-NORTH', loc]]), '2026-03-03T00:30:00Z')).toEqual([]);
    // The location now closes its day at 04:00 local (03:00Z): 01:00Z passes without a deadline close.
    const later = new Map([['DC-NORTH', { ...loc, dayCloseDeadline: '04:00' } as Location]]);
    expect(deadlines(later, '2026-03-03T02:30:00Z')).toEqual([]);
    expect(deadlines(later, '2026-03-03T03:00:00Z')).toMatchObject([{ record: { date: '2026-03-02', deadlineMs: Date.parse('2026-03-03T03:00:00Z') } }]);
  });

  it('follows the time zone change of daylight saving time from one deadline to the next', () => {
    // Europe/Berlin moves to summer time on Sunday 2026-03-29: the 02:00 deadline of Saturday 28 is 01:00Z (CET), of
    // Sunday 29 (on Monday 30) 00:00Z (CEST).
    const cursors = new Map([['DC-NORTH', startCursor(loc, Date.parse('2026-03-28T09:00:00Z'), DEFAULT_STAGE_SETTINGS)]]);
    const locations = new Map([['DC-NORTH', loc]]);
    const due = clockRecordsDue(Date.parse('2026-03-30T00:00:00Z'), locations, cursors, DEFAULT_STAGE_SETTINGS).filter((r) => r.kind === 'deadline-close');
    expect(due.map((r) => [r.record.date, new Date(r.arrivalMs).toISOString()])).toEqual([
      ['2026-03-28', '2026-03-29T01:00:00.000Z'],
      ['2026-03-29', '2026-03-30T00:00:00.000Z'],
    ]);
  });
});
