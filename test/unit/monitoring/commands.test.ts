import { describe, expect, it } from 'vitest';
import { applyCommand } from '../../../src/monitoring/intraday.ts';
import { monitorDay } from '../../../src/monitoring/monitor-day.ts';
import { at, businessDates, dayInput, quiet, runDays } from './helpers.ts';

const DATES = businessDates('2026-03-02', 12);
const ID = `DC-NORTH|SPARK-LEMON-330|spike|${DATES[0]}`;

function spikeEachDay(n: number, intake: (i: number) => number) {
  return DATES.slice(0, n).map((d, i) => dayInput(d, [...quiet(8), { item: 'SPARK-LEMON-330', intake: intake(i), expected: 40 }]));
}

describe('planner commands', () => {
  const opened = runDays(spikeEachDay(1, () => 80)).state;

  it('acknowledges with one record naming who did it, on the local date of the command', () => {
    const r = applyCommand(opened, { commandId: 'cmd-1', alertId: ID, action: 'acknowledge', by: 'planner.anna', atMs: at(DATES[1]!, '08:15') });
    expect(r.outcome).toBe('applied');
    expect(r.alerts).toHaveLength(1);
    expect(r.alerts[0]).toMatchObject({ state: 'acknowledged', change: 'acknowledged', seq: 2, changedBy: 'planner.anna', changedOn: DATES[1] });
    const again = applyCommand(r.state, { commandId: 'cmd-1', alertId: ID, action: 'acknowledge', by: 'planner.anna', atMs: at(DATES[1]!, '08:15') });
    expect(again).toMatchObject({ outcome: 'duplicate', alerts: [] });
  });

  it('keeps the acknowledgement through later days of the same episode, and re-escalates when it gets worse', () => {
    // 70 on 40 is +75%: medium on size (the CUSUM re-centres on the new level on day 2, also medium); day 5 jumps to
    // 240 (+500%: high).
    const days = spikeEachDay(5, (i) => (i === 4 ? 240 : 70));
    let state = monitorDay(null, days[0]!).state;
    state = applyCommand(state, { commandId: 'ack-1', alertId: ID, action: 'acknowledge', atMs: at(DATES[0]!, '20:00') }).state;
    const records = [];
    for (const d of days.slice(1)) {
      const r = monitorDay(state, d);
      records.push(...r.alerts);
      // Re-applying a day never undoes the acknowledgement.
      expect(monitorDay(r.state, d).outcome).toBe('duplicate');
      state = r.state;
    }
    expect(records.map((a) => [a.change, a.state, a.severity])).toEqual([['escalated', 'open', 'high']]);
  });

  it('snoozes up to the bound and opens again after the snooze', () => {
    const tooLong = applyCommand(opened, { commandId: 's-1', alertId: ID, action: 'snooze', until: '2026-03-20', atMs: at(DATES[0]!, '19:00') });
    expect(tooLong.outcome).toBe('refused');
    expect(tooLong.refused!.code).toBe('NEARCAST_ALERT_SNOOZE_INVALID');
    const ok = applyCommand(opened, { commandId: 's-2', alertId: ID, action: 'snooze', until: DATES[2]!, atMs: at(DATES[0]!, '19:00') });
    expect(ok.alerts[0]).toMatchObject({ state: 'snoozed', snoozedUntil: DATES[2] });
    const days = spikeEachDay(5, () => 80).slice(1);
    const { alerts } = runDays(days, undefined, ok.state);
    expect(alerts.map((a) => [a.change, a.changedOn])).toEqual([['snooze-ended', DATES[3]]]);
  });

  it('refuses an unknown alert and a change a resolved alert cannot make', () => {
    expect(applyCommand(opened, { commandId: 'x', alertId: 'DC-NORTH|NOPE|spike|2026-03-02', action: 'resolve', atMs: 0 }).refused!.code).toBe('NEARCAST_ALERT_NOT_FOUND');
    const resolved = applyCommand(opened, { commandId: 'r', alertId: ID, action: 'resolve', by: 'planner.anna', atMs: at(DATES[0]!, '19:00') });
    expect(resolved.alerts[0]).toMatchObject({ state: 'resolved', change: 'resolved' });
    const ack = applyCommand(resolved.state, { commandId: 'a', alertId: ID, action: 'acknowledge', atMs: at(DATES[0]!, '19:05') });
    expect(ack.refused!.code).toBe('NEARCAST_ALERT_TRANSITION_INVALID');
    expect(applyCommand(opened, { commandId: 'bad', alertId: ID, action: 'snooze', atMs: 1 }).issues![0]!.path).toBe('until');
  });

  it('applies commands that come with the day before the day is monitored', () => {
    const days = spikeEachDay(2, () => 80);
    const r = monitorDay(opened, { ...days[1]!, commands: [{ commandId: 'c1', alertId: ID, action: 'acknowledge', atMs: at(DATES[1]!, '09:00') }] });
    expect(r.commands).toEqual([{ commandId: 'c1', status: 'applied' }]);
    expect(r.alerts.map((a) => a.change)).toEqual(['acknowledged']);
  });

  it('acknowledging a group alert acknowledges its active members', () => {
    const items = ['COLA-1L', 'COLA-ZERO-1L', 'TONIC-200', 'GINGER-ALE-200'];
    const { state, alerts } = runDays([dayInput(DATES[0]!, [...quiet(8), ...items.map((item) => ({ item, intake: 150, expected: 40 }))])]);
    const group = alerts.find((a) => a.scope === 'location')!;
    const r = applyCommand(state, { commandId: 'g1', alertId: group.alertId, action: 'acknowledge', by: 'planner.ben', atMs: at(DATES[0]!, '21:00') });
    expect(r.alerts.map((a) => a.scope)).toEqual(['location', 'series', 'series', 'series', 'series']);
    expect(r.alerts.every((a) => a.state === 'acknowledged' && a.changedBy === 'planner.ben')).toBe(true);
  });
});
