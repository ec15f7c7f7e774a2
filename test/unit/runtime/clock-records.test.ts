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
});
