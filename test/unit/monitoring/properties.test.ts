import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Alert } from '../../../src/contracts/alert.ts';
import { applyCommand } from '../../../src/monitoring/intraday.ts';
import { monitorDay } from '../../../src/monitoring/monitor-day.ts';
import type { MonitorState } from '../../../src/monitoring/state.ts';
import { at, businessDates, dayInput, quiet } from './helpers.ts';

// Properties of the whole monitor over generated days: each run is a location with quiet series (intake equal to
// its expectation) and a few series that depart from it in generated ways.

const DATES = businessDates('2026-03-02', 25);
const ITEMS = ['COLA-1L', 'COLA-ZERO-1L', 'SPARK-LEMON-330', 'SPARK-LIME-330', 'TONIC-200', 'GINGER-ALE-200', 'WATER-500', 'ICED-TEA-500'];

function byAlert(records: readonly Alert[]): Map<string, Alert[]> {
  const m = new Map<string, Alert[]>();
  for (const r of records) m.set(r.alertId, [...(m.get(r.alertId) ?? []), r]);
  return m;
}

function run(days: ReturnType<typeof dayInput>[], onEach?: (state: MonitorState, i: number) => MonitorState): { records: Alert[]; state: MonitorState } {
  let state: MonitorState | null = null;
  const records: Alert[] = [];
  days.forEach((d, i) => {
    const r = monitorDay(state, d);
    expect(r.outcome).toBe('applied');
    records.push(...r.alerts);
    state = onEach ? onEach(r.state, i) : r.state;
  });
  return { records, state: state! };
}

// Per item and day: the multiple of its expectation that day (1 = in control).
const scenarioArb = fc.array(fc.array(fc.constantFrom(1, 1, 1, 1, 0.2, 2.5, 4), { minLength: 12, maxLength: 12 }), { minLength: 8, maxLength: 8 });
const toDays = (multiples: number[][]) =>
  DATES.slice(0, 12).map((d, i) => dayInput(d, [...quiet(6), ...ITEMS.map((item, k) => ({ item, intake: Math.round(40 * multiples[k]![i]!), expected: 40 }))]));

describe('monitoring as a whole (properties)', () => {
  it('publishes per alert a gapless seq from 1, opening first, and resolves only what was open', () => {
    fc.assert(
      fc.property(scenarioArb, (multiples) => {
        const { records } = run(toDays(multiples));
        for (const rs of byAlert(records).values()) {
          expect(rs.map((r) => r.seq)).toEqual(rs.map((_, i) => i + 1));
          expect(rs[0]!.change).toBe('opened');
          rs.forEach((r, i) => {
            if (r.state === 'resolved' && i > 0) expect(rs[i - 1]!.state).not.toBe('resolved');
          });
        }
      }),
      { numRuns: 40 },
    );
  });

  it('gives one episode one alert: a sustained departure with short pauses opens exactly one alert', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 14 }),
        fc.double({ min: 2.5, max: 5, noNaN: true }),
        fc.array(fc.integer({ min: 1, max: 13 }), { maxLength: 3 }),
        (length, multiple, pauses) => {
          const pause = new Set(pauses.filter((p) => p < length - 1));
          const days = DATES.map((d, i) =>
            dayInput(d, [...quiet(6), { item: 'TONIC-200', intake: i >= 2 && i < 2 + length && !pause.has(i - 2) ? Math.round(40 * multiple) : 40, expected: 40 }]),
          );
          const { records } = run(days);
          const tonic = records.filter((r) => r.item === 'TONIC-200');
          expect(new Set(tonic.map((r) => r.alertId)).size).toBe(1);
          expect(tonic.filter((r) => r.change === 'opened' || r.change === 'reopened')).toHaveLength(1);
        },
      ),
      { numRuns: 40 },
    );
  });

  it('keeps an acknowledgement through re-applied days and a departure that does not get worse', () => {
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 10 }), fc.integer({ min: 0, max: 3 }), (length, replays) => {
        // +75% is medium on size on the spike rule and on the re-centred shift alike, so nothing escalates.
        const days = DATES.slice(0, length).map((d) => dayInput(d, [...quiet(6), { item: 'TONIC-200', intake: 70, expected: 40 }]));
        let state = monitorDay(null, days[0]!).state;
        const id = Object.keys(state.alerts)[0]!;
        state = applyCommand(state, { commandId: 'ack', alertId: id, action: 'acknowledge', atMs: at(DATES[0]!, '19:00') }).state;
        for (const d of days.slice(1)) {
          for (let k = 0; k < replays; k++) expect(monitorDay(state, days[0]!).outcome).not.toBe('applied');
          const r = monitorDay(state, d);
          for (let k = 0; k < replays; k++) expect(monitorDay(r.state, d).alerts).toEqual([]);
          expect(r.alerts.filter((a) => a.alertId === id)).toEqual([]);
          state = r.state;
          expect(state.alerts[id]!.life.state).toBe('acknowledged');
        }
      }),
      { numRuns: 30 },
    );
  });

  it('never loses a group member: every grouped series stays listed in its group, and group member lists only grow', () => {
    fc.assert(
      fc.property(scenarioArb, (multiples) => {
        const { records, state } = run(toDays(multiples));
        const latest = new Map<string, Alert>();
        for (const r of records) {
          if (r.scope === 'series' || r.scope === 'item') continue;
          const prev = latest.get(r.alertId);
          if (prev) for (const m of prev.members) expect(r.members).toContainEqual(m);
          latest.set(r.alertId, r);
        }
        // Every series record that names a group is listed by that group.
        for (const r of records) {
          if (r.scope !== 'series' || r.groupId === null) continue;
          expect(latest.get(r.groupId), `group ${r.groupId} has records`).toBeDefined();
          expect(latest.get(r.groupId)!.members).toContainEqual({ location: 'DC-NORTH', item: r.item });
        }
        for (const entry of Object.values(state.alerts)) {
          if (entry.scope !== 'series' || entry.groupId === null || !latest.has(entry.groupId)) continue;
          const group = state.alerts[entry.groupId]!;
          expect(group.members).toContain(`DC-NORTH|${entry.item}`);
          expect(latest.get(entry.groupId)!.members).toContainEqual({ location: 'DC-NORTH', item: entry.item });
        }
      }),
      { numRuns: 40 },
    );
  });
});
