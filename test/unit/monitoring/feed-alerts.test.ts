import { describe, expect, it } from 'vitest';
import { checkFeed } from '../../../src/monitoring/intraday.ts';
import { monitorDay } from '../../../src/monitoring/monitor-day.ts';
import { initialMonitorState } from '../../../src/monitoring/state.ts';
import { at, businessDates, dayInput, HOURS, LOCATION, quiet, TZ } from './helpers.ts';

const DATES = businessDates('2026-03-02', 6);
const check = (date: string, clock: string, lastRecordMs: number | null) => ({ location: LOCATION, atMs: at(date, clock), timeZone: TZ, lastRecordMs, isBusinessDay: true, businessHours: HOURS });

describe('feed health', () => {
  const empty = initialMonitorState(LOCATION);

  it('raises feed-stalled once the feed has been silent for three business hours, and pages it', () => {
    expect(checkFeed(empty, check(DATES[0]!, '12:00', at(DATES[0]!, '09:30'))).outcome).toBe('duplicate');
    const r = checkFeed(empty, check(DATES[0]!, '13:00', at(DATES[0]!, '09:30')));
    expect(r.alerts).toHaveLength(1);
    expect(r.alerts[0]).toMatchObject({ rule: 'feed-stalled', scope: 'location', item: '*', severity: 'high', delivery: 'page', alertId: `DC-NORTH|*|feed-stalled|${DATES[0]}` });
    // Silence before the location opens is not a stall: yesterday's last record at 17:50, check at 08:00.
    expect(checkFeed(empty, check(DATES[1]!, '08:00', at(DATES[0]!, '17:50'))).alerts).toEqual([]);
  });

  it('waits longer for a quiet feed whose silence is likely', () => {
    // 0.5 records an hour: P[no record in t] = e^(−0.5t) < 0.001 needs t > 13.8 h, more than a business day.
    const r = checkFeed(empty, { ...check(DATES[0]!, '17:00', at(DATES[0]!, '09:30')), recordsPerHour: 0.5 });
    expect(r.alerts).toEqual([]);
  });

  it('holds back drops while the feed is stalled, folds the missed close into the same trouble, and resolves when records flow again', () => {
    const stalled = checkFeed(empty, check(DATES[0]!, '13:00', at(DATES[0]!, '09:30'))).state;
    const closing = monitorDay(
      stalled,
      dayInput(DATES[0]!, [...quiet(6), { item: 'COLA-1L-X', intake: 5, expected: 60 }], {}, { closedBy: 'deadline', lastRecordMs: at(DATES[0]!, '09:30') }),
    );
    expect(closing.alerts).toEqual([]);
    expect(closing.digest).toMatchObject({ heldBack: 'feed', heldBackDrops: 1 });
    const back = monitorDay(closing.state, dayInput(DATES[1]!, quiet(6)));
    expect(back.alerts.map((a) => [a.rule, a.change])).toEqual([['feed-stalled', 'auto-resolved']]);
  });

  it('raises day-not-closed when the source misses its own deadline, and clears it at the next normal close', () => {
    const r = monitorDay(null, dayInput(DATES[0]!, quiet(3), {}, { closedBy: 'deadline' }));
    expect(r.alerts.map((a) => [a.rule, a.severity])).toEqual([['day-not-closed', 'medium']]);
    expect(monitorDay(null, dayInput(DATES[0]!, quiet(3), {}, { closedBy: 'deadline', ownDeadline: false })).alerts).toEqual([]);
    const next = monitorDay(r.state, dayInput(DATES[1]!, quiet(3)));
    expect(next.alerts.map((a) => a.change)).toEqual(['auto-resolved']);
  });

  it('finds a stall at the close too, from the last record time alone', () => {
    const r = monitorDay(null, dayInput(DATES[0]!, quiet(3), {}, { lastRecordMs: at(DATES[0]!, '11:00') }));
    expect(r.alerts.map((a) => a.rule)).toEqual(['feed-stalled']);
  });

  it('ignores a check of a day already closed or of a closed weekday', () => {
    const closed = monitorDay(null, dayInput(DATES[0]!, quiet(3))).state;
    expect(checkFeed(closed, check(DATES[0]!, '13:00', null)).outcome).toBe('ignored');
    expect(checkFeed(empty, { ...check(DATES[0]!, '13:00', null), isBusinessDay: false }).outcome).toBe('ignored');
    expect(checkFeed(empty, { ...check(DATES[0]!, '13:00', null), atMs: 'noon' }).issues![0]!.path).toBe('atMs');
  });
});
