import { describe, expect, it } from 'vitest';
import { alertSchema } from '../../../src/contracts/alert.ts';
import { monitorDay } from '../../../src/monitoring/monitor-day.ts';
import { monitoringSettings } from '../../../src/monitoring/settings.ts';
import { initialMonitorState, restoreMonitorState } from '../../../src/monitoring/state.ts';
import { businessDates, dayInput, quiet, runDays } from './helpers.ts';

const DATES = businessDates('2026-03-02', 15);

describe('monitorDay', () => {
  it('publishes every state change as a record that matches the alert contract', () => {
    const inputs = DATES.slice(0, 10).map((d, i) => dayInput(d, [...quiet(5), { item: 'SPARK-LEMON-330', intake: i === 2 ? 160 : 40, expected: 40 }]));
    const { alerts } = runDays(inputs);
    expect(alerts.length).toBeGreaterThan(0);
    for (const a of alerts) expect(alertSchema.safeParse(a).success).toBe(true);
  });

  it('changes nothing and publishes nothing when the same day is applied again', () => {
    const input = dayInput(DATES[0]!, [...quiet(5), { item: 'SPARK-LEMON-330', intake: 160, expected: 40 }]);
    const first = monitorDay(null, input);
    expect(first.alerts.length).toBe(1);
    const again = monitorDay(first.state, input);
    expect(again.outcome).toBe('duplicate');
    expect(again.alerts).toEqual([]);
    expect(again.state).toEqual(first.state);
  });

  it('gives the same result when the caller hands its state over, and leaves a state it keeps untouched', () => {
    const days = DATES.slice(0, 12).map((d, i) => dayInput(d, [...quiet(6), { item: 'SPARK-LEMON-330', intake: i === 3 ? 160 : i >= 8 ? 12 : 40, expected: 40 }]));
    let copied = monitorDay(null, days[0]!).state;
    let handed = monitorDay(null, days[0]!).state;
    let alerts = 0;
    for (const day of days.slice(1)) {
      const before = JSON.stringify(copied);
      const a = monitorDay(copied, day);
      expect(JSON.stringify(copied)).toBe(before);
      const b = monitorDay(handed, day, undefined, { handOver: true });
      expect(b.state).toBe(handed);
      expect(JSON.stringify(b.alerts)).toBe(JSON.stringify(a.alerts));
      expect(JSON.stringify(b.state)).toBe(JSON.stringify(a.state));
      alerts += a.alerts.length;
      copied = a.state;
      handed = b.state;
    }
    // The run opens and changes alerts, so the states compared carry alert life cycles, not just counters.
    expect(alerts).toBeGreaterThan(1);
  });

  it('treats a day before the last one applied as stale', () => {
    const s = monitorDay(null, dayInput(DATES[1]!, quiet(3))).state;
    expect(monitorDay(s, dayInput(DATES[0]!, quiet(3))).outcome).toBe('stale');
  });

  it('opens one paged spike alert with exact limits, p- and q-value and value at risk', () => {
    const r = monitorDay(null, dayInput(DATES[0]!, [...quiet(9), { item: 'SPARK-LEMON-330', intake: 160, expected: 40, unitPrice: 3 }]));
    expect(r.alerts).toHaveLength(1);
    const a = r.alerts[0]!;
    expect(a).toMatchObject({ rule: 'spike', scope: 'series', state: 'open', change: 'opened', seq: 1, delivery: 'page', observed: 160, expected: 40, unitsAtRisk: 120 });
    expect(a.alertId).toBe(`DC-NORTH|SPARK-LEMON-330|spike|${DATES[0]}`);
    // 160 units on an expectation of 40 is 300% above: high on size; 120 × 3 = 360 at risk is low on value → medium.
    expect(a.valueAtRisk).toBe(360);
    expect(a.severity).toBe('medium');
    expect(a.upper!).toBeLessThan(160);
    expect(a.pValue!).toBeLessThan(1e-10);
    expect(a.qValue!).toBeGreaterThanOrEqual(a.pValue!);
    expect(a.message).toContain('160 ordered');
    // A distribution centre reads the message: quantities, never money.
    expect(a.message).not.toContain('360');
  });

  it('holds back drops on a holiday but still raises spikes', () => {
    const input = dayInput(DATES[0]!, [...quiet(8), { item: 'COLA-1L-LOW', intake: 0, expected: 60 }, { item: 'COLA-1L-HIGH', intake: 200, expected: 60 }], { isHoliday: true });
    const r = monitorDay(null, input);
    expect(r.alerts.map((a) => a.rule)).toEqual(['spike']);
    expect(r.digest).toMatchObject({ heldBackDrops: 1, heldBack: 'holiday' });
    const normal = monitorDay(null, { ...input, isHoliday: false });
    expect(normal.alerts.map((a) => a.rule).sort()).toEqual(['drop', 'spike']);
  });

  it('raises nothing below the value floor: 5 units on a mean of 0.5 is significant but too small', () => {
    // P[X ≥ 5 | Poisson 0.5] ≈ 1.7e-4 (far beyond the limits), but 4.5 units is below the 5-unit floor.
    const r = monitorDay(null, dayInput(DATES[0]!, [...quiet(4), { item: 'GINGER-SHOT-60', intake: 5, expected: 0.5 }]));
    expect(r.digest!.discoveries).toBe(1);
    expect(r.digest!.belowFloor).toBe(1);
    expect(r.alerts).toEqual([]);
    // With a price the floor is money: 4.5 units × 40 = 180 ≥ 100.
    const priced = monitorDay(null, dayInput(DATES[0]!, [...quiet(4), { item: 'GINGER-SHOT-60', intake: 5, expected: 0.5, unitPrice: 40 }]));
    expect(priced.alerts.map((a) => a.rule)).toEqual(['spike']);
  });

  it('does not test late records as today’s intake and lists them in the digest', () => {
    const r = monitorDay(null, dayInput(DATES[1]!, [...quiet(5), { item: 'SPARK-LEMON-330', intake: 40, expected: 40, lateIntake: [{ date: DATES[0], quantity: 400 }] }]));
    expect(r.alerts).toEqual([]);
    expect(r.digest!.lateData).toEqual([{ item: 'SPARK-LEMON-330', date: DATES[0], quantity: 400 }]);
  });

  it('quarantines a bad series entry with its field and reason and monitors the rest', () => {
    const input = dayInput(DATES[0]!, [...quiet(3), { item: 'SPARK-LEMON-330', intake: 160, expected: 40 }]);
    input.series.push({ item: 'BAD ITEM', intake: -3, expectedFromPlan: 2, expectedFromBaseline: 2 } as never);
    input.series.push({ ...input.series[0]! });
    const r = monitorDay(null, input);
    expect(r.outcome).toBe('applied');
    expect(r.alerts.map((a) => a.item)).toEqual(['SPARK-LEMON-330']);
    expect(r.digest!.quarantined).toHaveLength(2);
    const bad = r.digest!.quarantined[0]!;
    expect(bad.issues.map((i) => i.path)).toEqual(expect.arrayContaining(['series.4.item', 'series.4.intake']));
    expect(bad.issues.find((i) => i.path === 'series.4.intake')!.message).toBe('must not be negative');
    expect(r.digest!.quarantined[1]!.issues[0]!.message).toBe('appears more than once for the day');
  });

  it('rejects a day with a clear reason naming the field, and changes no state', () => {
    const state = initialMonitorState('DC-NORTH');
    const { feed: _feed, ...noFeed } = dayInput(DATES[0]!, quiet(2));
    const r = monitorDay(state, noFeed);
    expect(r.outcome).toBe('rejected');
    expect(r.rejected!.code).toBe('NEARCAST_MONITORING_INPUT_INVALID');
    expect(r.rejected!.issues.map((i) => i.path)).toContain('feed');
    expect(r.state).toBe(state);
    const other = monitorDay(state, { ...dayInput(DATES[0]!, quiet(2)), location: 'DC-SOUTH' });
    expect(other.rejected!.issues[0]).toEqual({ path: 'location', message: 'is DC-SOUTH but this monitoring state belongs to DC-NORTH' });
  });

  it('auto-resolves a spike after five in-control days', () => {
    const inputs = DATES.slice(0, 8).map((d, i) => dayInput(d, [...quiet(5), { item: 'SPARK-LEMON-330', intake: i === 0 ? 160 : 40, expected: 40 }]));
    const { alerts } = runDays(inputs);
    expect(alerts.map((a) => [a.change, a.changedOn])).toEqual([
      ['opened', DATES[0]],
      ['auto-resolved', DATES[5]],
    ]);
  });

  it('keeps its state as plain JSON that restores to the same behaviour', () => {
    const inputs = DATES.slice(0, 6).map((d, i) => dayInput(d, [...quiet(5), { item: 'SPARK-LEMON-330', intake: i === 1 ? 160 : 40, expected: 40 }]));
    const { state } = runDays(inputs.slice(0, 4));
    const restored = restoreMonitorState(JSON.stringify(state));
    expect(restored).toEqual(state);
    const a = runDays(inputs.slice(4), undefined, state);
    const b = runDays(inputs.slice(4), undefined, restored);
    expect(b.alerts).toEqual(a.alerts);
    expect(() => restoreMonitorState('{"version":1}')).toThrowError(/monitoring state/);
    expect(() => restoreMonitorState('not json')).toThrowError(expect.objectContaining({ code: 'NEARCAST_STATE_CORRUPT' }));
  });

  it('names the bad field of a settings override', () => {
    expect(() => monitoringSettings({ shift: { h: -1 } })).toThrowError(/monitoring\.shift\.h/);
    expect(() => monitoringSettings({ severity: { mediumShare: 2, highShare: 1 } })).toThrowError(/monitoring\.severity\.highShare: must not be below mediumShare/);
  });
});
