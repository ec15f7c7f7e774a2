import { describe, expect, it } from 'vitest';
import type { Alert } from '../../../src/contracts/alert.ts';
import { groupAcrossLocations, initialCrossLocationState } from '../../../src/monitoring/cross-location.ts';
import { monitorDay } from '../../../src/monitoring/monitor-day.ts';
import type { MonitorState } from '../../../src/monitoring/state.ts';
import { businessDates, dayInput, quiet } from './helpers.ts';

const DATES = businessDates('2026-06-01', 10);
const LOCATIONS = ['DC-NORTH', 'DC-SOUTH', 'DC-COAST'];

// Each location's monitoring on its own; the item ICED-TEA-500 spikes at each on a different day.
function locationRecords(spikeDay: Record<string, number>): Alert[][] {
  const states: Record<string, MonitorState | null> = {};
  return DATES.map((date, i) =>
    LOCATIONS.flatMap((loc) => {
      const input = { ...dayInput(date, [...quiet(6), { item: 'ICED-TEA-500', intake: i === spikeDay[loc] ? 160 : 40, expected: 40 }]), location: loc };
      const r = monitorDay(states[loc] ?? null, input);
      states[loc] = r.state;
      return r.alerts;
    }),
  );
}

function crossRun(perDay: Alert[][]) {
  let state = initialCrossLocationState();
  const out: Alert[] = [];
  perDay.forEach((records, i) => {
    const r = groupAcrossLocations(state, DATES[i]!, records);
    state = r.state;
    out.push(...r.alerts);
  });
  return out;
}

describe('grouping one item across locations', () => {
  it('raises one item alert when the item fires the same way at three locations within three days', () => {
    const out = crossRun(locationRecords({ 'DC-NORTH': 1, 'DC-SOUTH': 2, 'DC-COAST': 3 }));
    const opened = out.find((a) => a.change === 'opened')!;
    expect(opened).toMatchObject({ scope: 'item', location: '*', item: 'ICED-TEA-500', rule: 'demand-up', changedOn: DATES[3], alertId: `*|ICED-TEA-500|demand-up|${DATES[3]}` });
    expect(opened.members.map((m) => m.location).sort()).toEqual([...LOCATIONS].sort());
    expect(out.at(-1)!.change).toBe('auto-resolved');
  });

  it('does not group signals spread wider than the window', () => {
    expect(crossRun(locationRecords({ 'DC-NORTH': 0, 'DC-SOUTH': 3, 'DC-COAST': 6 }))).toEqual([]);
  });

  it('changes nothing when the same date is fed again', () => {
    const perDay = locationRecords({ 'DC-NORTH': 1, 'DC-SOUTH': 1, 'DC-COAST': 1 });
    const first = groupAcrossLocations(initialCrossLocationState(), DATES[1]!, perDay[1]!);
    expect(first.alerts).toHaveLength(1);
    expect(groupAcrossLocations(first.state, DATES[1]!, perDay[1]!)).toEqual({ state: first.state, alerts: [] });
  });
});
