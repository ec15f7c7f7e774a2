import { createLocationCalendar, type LocationCalendar } from '../calendar/location-calendar.ts';
import type { Location } from '../contracts/location.ts';
import { parseTimestamp } from '../contracts/primitives.ts';
import { retentionWeeks, type SensingSettings, DEFAULT_SENSING_SETTINGS } from './settings.ts';
import { createSeriesState, type SeriesState } from './series-state.ts';

/**
 * Everything nearcast remembers about one location: master data, calendar and one state per series. Mutable for
 * speed (apply functions change it in place); `snapshotLocationState` gives a canonical JSON form.
 */
export interface LocationState {
  readonly location: string;
  master: Location;
  calendar: LocationCalendar;
  /** Highest knowledge instant applied so far (ms), null before the first record: the location's event time. */
  watermarkMs: number | null;
  /** Weeks of history kept (lookback + leads + feature windows). */
  readonly retentionWeeks: number;
  /** Revisions older than this many weeks behind the watermark are too late (lookback plus horizon). */
  readonly tooLateWeeks: number;
  readonly series: Map<string, SeriesState>;
  readonly customers: string[];
  readonly customerIndex: Map<string, number>;
  /** Local days the source declared closed. */
  readonly closedDays: Set<number>;
}

/** Options of every apply function. */
export interface ApplyOptions {
  /**
   * When the record became known to nearcast (RFC 3339 or epoch ms). A record that arrives after its own time
   * (late data) is known from here on, never earlier; the record's own time is used when this is absent or earlier.
   */
  readonly knownAt?: string | number;
}

export function createLocationState(master: Location, settings: SensingSettings = DEFAULT_SENSING_SETTINGS): LocationState {
  return {
    location: master.location,
    master,
    calendar: createLocationCalendar(master),
    watermarkMs: null,
    retentionWeeks: retentionWeeks(settings),
    tooLateWeeks: settings.lookbackWeeks + settings.maxLead + 1,
    series: new Map(),
    customers: [],
    customerIndex: new Map(),
    closedDays: new Set(),
  };
}

export function seriesOf(state: LocationState, item: string): SeriesState {
  let s = state.series.get(item);
  if (!s) {
    s = createSeriesState(item);
    state.series.set(item, s);
  }
  return s;
}

export function customerIndexOf(state: LocationState, customer: string | undefined): number {
  if (customer === undefined) return -1;
  let i = state.customerIndex.get(customer);
  if (i === undefined) {
    i = state.customers.length;
    state.customers.push(customer);
    state.customerIndex.set(customer, i);
  }
  return i;
}

/** Effective knowledge instant of a record: its own time, or the later moment it became known. */
export function effectiveKnownMs(recordMs: number, options: ApplyOptions | undefined): number {
  const k = options?.knownAt;
  if (k === undefined) return recordMs;
  const ms = typeof k === 'number' ? k : parseTimestamp(k);
  return ms !== undefined && Number.isFinite(ms) && ms > recordMs ? ms : recordMs;
}

/** Whether a record of this time is older than the lookback plus the horizon behind the location's event time. */
export function isTooLate(state: LocationState, recordMs: number): boolean {
  return state.watermarkMs !== null && recordMs < state.watermarkMs - state.tooLateWeeks * 7 * 86_400_000;
}

export function advanceWatermark(state: LocationState, knownMs: number): void {
  if (state.watermarkMs === null || knownMs > state.watermarkMs) state.watermarkMs = knownMs;
}
