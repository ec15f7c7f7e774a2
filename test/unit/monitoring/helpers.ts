import { DateTime } from 'luxon';
import type { Alert } from '../../../src/contracts/alert.ts';
import { monitorDay, type MonitorDayResult } from '../../../src/monitoring/monitor-day.ts';
import { DEFAULT_MONITORING_SETTINGS, type MonitoringSettings } from '../../../src/monitoring/settings.ts';
import type { MonitorState } from '../../../src/monitoring/state.ts';
import { businessDates } from '../../../src/monitoring/simulate.ts';

// Small builders for hand-written monitoring days at one invented location.

export const LOCATION = 'DC-NORTH';
export const TZ = 'Europe/Berlin';
export const HOURS = { open: '06:00', close: '18:00' };

export const at = (date: string, clock: string): number => DateTime.fromISO(`${date}T${clock}`, { zone: TZ }).toMillis();
export const nextDay = (date: string): string => DateTime.fromISO(date).plus({ days: 1 }).toISODate()!;
export const weekStartOf = (date: string): string => DateTime.fromISO(date).startOf('week').toISODate()!;

export { businessDates };

export interface SeriesSpec {
  item: string;
  intake: number;
  expected: number;
  baseline?: number;
  [extra: string]: unknown;
}

export function dayInput(date: string, series: SeriesSpec[], extra: Record<string, unknown> = {}, feed: Record<string, unknown> = {}) {
  return {
    location: LOCATION,
    date,
    weekStart: weekStartOf(date),
    timeZone: TZ,
    isHoliday: false,
    series: series.map(({ item, intake, expected, baseline, ...rest }) => ({
      item,
      intake,
      expectedFromPlan: expected,
      expectedFromBaseline: baseline ?? expected,
      baselineVersion: 1,
      ...rest,
    })),
    feed: { closedBy: 'day-closed', ownDeadline: true, closeMs: at(nextDay(date), '00:30'), lastRecordMs: at(date, '17:50'), businessHours: HOURS, ...feed },
    ...extra,
  };
}

/** Runs days in order, failing loudly on anything but 'applied'. */
export function runDays(
  inputs: ReadonlyArray<{ readonly date: string }>,
  settings: MonitoringSettings = DEFAULT_MONITORING_SETTINGS,
  start: MonitorState | null = null,
): { state: MonitorState; results: MonitorDayResult[]; alerts: Alert[] } {
  let state = start;
  const results: MonitorDayResult[] = [];
  for (const input of inputs) {
    const r = monitorDay(state, input, settings);
    if (r.outcome !== 'applied') throw new Error(`${input.date}: ${r.outcome} ${JSON.stringify(r.rejected)}`);
    state = r.state;
    results.push(r);
  }
  return { state: state!, results, alerts: results.flatMap((r) => r.alerts) };
}

/** `n` quiet series at a steady expectation (intake equal to it: in control, no noise). */
export function quiet(n: number, expected = 40, prefix = 'COLA-1L-'): SeriesSpec[] {
  return Array.from({ length: n }, (_, i) => ({ item: `${prefix}${String(i).padStart(2, '0')}`, intake: expected, expected }));
}
