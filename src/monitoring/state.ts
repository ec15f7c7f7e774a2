import { z } from 'zod';
import type { AlertChange, AlertRule } from '../contracts/alert.ts';
import { NearcastError } from '../errors.ts';
import { emptyDispersion, type DispersionAccumulator } from '../stats/dispersion.ts';
import { CUSUM_START, type CusumState } from './cusum.ts';
import type { EwmaState } from './ewma.ts';
import type { Lifecycle, Severity } from './lifecycle.ts';
import { emptyNoisePool, type NoisePool } from './noise.ts';
import type { TriggState } from './tracking-signal.ts';

// Monitoring state of one location: plain JSON, so it can be snapshotted into the changelog and restored.

export type Direction = 'up' | 'down';
export type Scope = 'series' | 'location' | 'customer' | 'item';

export interface Measure {
  observed: number | null;
  expected: number | null;
  lower: number | null;
  upper: number | null;
  pValue: number | null;
  qValue: number | null;
  levelRatio: number | null;
  statistic: number | null;
  /** |observed − expected| / expected, the size behind the severity. */
  relative: number | null;
  unitsAtRisk: number | null;
  valueAtRisk: number | null;
}

export interface AlertEntry {
  alertId: string;
  scope: Scope;
  rule: AlertRule;
  location: string;
  item: string;
  customer: string | null;
  direction: Direction | null;
  episodeStart: string;
  life: Lifecycle;
  seq: number;
  delivery: 'page' | 'digest';
  changedBy: string | null;
  lastChange: AlertChange;
  measure: Measure;
  firedRules: AlertRule[];
  /** Series covered: `location|item` keys (the series itself for series scope). */
  members: string[];
  groupId: string | null;
  /** Feed-stalled: arrival of the last record when the stall was found (records after it end the stall). */
  lastRecordMs?: number | null;
}

export interface WeekFact {
  weekStart: string;
  actual: number;
  baseline: number;
  adjusted: number | null;
}

export interface SeriesState {
  /** Re-centring factor: the shift statistic compares intake with level × baseline intake. */
  level: number;
  baselineVersion: number | null;
  cusum: CusumState;
  /** Σ intake and Σ expectation over the current upper and lower CUSUM runs (the level after a signal). */
  run: { hiX: number; hiMu: number; loX: number; loMu: number; hiStart?: string; loStart?: string };
  ewma: EwmaState;
  /** Exponentially weighted intake and expectation with the EWMA's λ (the level after an EWMA signal). */
  ewmaX: number;
  ewmaMu: number;
  /** The series' own dispersion evidence against the plan (point) and the re-centred baseline (shift). */
  dispersion: { point: DispersionAccumulator; shift: DispersionAccumulator };
  /** Scores summed over the current long-run variance block. */
  block: { sum: number; days: number };
  /** Exponentially weighted daily intake per customer. */
  customers: Record<string, number>;
  trigg: TriggState | null;
  /** Weeks in a row the adjusted plan sat above (+) or below (−) the baseline. */
  adjustRun: number;
  history: WeekFact[];
  lastWeekScored: string | null;
  lastSeen: string;
  active: { up: string | null; down: string | null; divergence: string | null };
}

export interface MonitorState {
  version: 1;
  location: string;
  timeZone: string | null;
  lastDate: string | null;
  noise: { point: NoisePool; shift: NoisePool };
  series: Record<string, SeriesState>;
  alerts: Record<string, AlertEntry>;
  /** Latest group alert per group key (scope|key|direction). */
  groups: Record<string, string>;
  feed: { stalled: string | null; notClosed: string | null };
  /** Pages used on a date (feed checks during the day and the close share the budget). */
  pages: { date: string | null; used: number };
  /** Command ids applied, with the date they were applied (kept as long as resolved alerts are). */
  commands: Record<string, string>;
  replanWeek: string | null;
}

export function newSeriesState(on: string): SeriesState {
  return {
    level: 1,
    baselineVersion: null,
    cusum: CUSUM_START,
    run: { hiX: 0, hiMu: 0, loX: 0, loMu: 0 },
    ewma: { z: 0, t: 0 },
    ewmaX: 0,
    ewmaMu: 0,
    dispersion: { point: emptyDispersion(), shift: emptyDispersion() },
    block: { sum: 0, days: 0 },
    customers: {},
    trigg: null,
    adjustRun: 0,
    history: [],
    lastWeekScored: null,
    lastSeen: on,
    active: { up: null, down: null, divergence: null },
  };
}

export function initialMonitorState(location: string): MonitorState {
  return {
    version: 1,
    location,
    timeZone: null,
    lastDate: null,
    noise: { point: emptyNoisePool(), shift: emptyNoisePool() },
    series: {},
    alerts: {},
    groups: {},
    feed: { stalled: null, notClosed: null },
    pages: { date: null, used: 0 },
    commands: {},
    replanWeek: null,
  };
}

const stateShape = z.looseObject({
  version: z.literal(1),
  location: z.string().min(1),
  timeZone: z.string().nullable(),
  lastDate: z.string().nullable(),
  noise: z.looseObject({ point: z.record(z.string(), z.unknown()), shift: z.record(z.string(), z.unknown()) }),
  series: z.record(z.string(), z.looseObject({ level: z.number(), cusum: z.looseObject({ hi: z.number(), lo: z.number() }), active: z.looseObject({}) })),
  alerts: z.record(z.string(), z.looseObject({ alertId: z.string(), seq: z.number().int(), life: z.looseObject({ state: z.string() }) })),
  groups: z.record(z.string(), z.string()),
  feed: z.looseObject({}),
  pages: z.looseObject({ used: z.number() }),
  commands: z.record(z.string(), z.string()),
  replanWeek: z.string().nullable(),
});

/** Reads a snapshot back (e.g. from the changelog); a damaged one is an error, never a silent reset. */
export function restoreMonitorState(snapshot: unknown): MonitorState {
  const parsed = stateShape.safeParse(typeof snapshot === 'string' ? safeJson(snapshot) : snapshot);
  if (!parsed.success) {
    throw new NearcastError(
      'NEARCAST_STATE_CORRUPT',
      parsed.error.issues.slice(0, 5).map((i) => `monitoring state ${i.path.map(String).join('.') || '(root)'}: ${i.message}`),
    );
  }
  return structuredClone(parsed.data) as unknown as MonitorState;
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}

export const EMPTY_MEASURE: Measure = Object.freeze({
  observed: null,
  expected: null,
  lower: null,
  upper: null,
  pValue: null,
  qValue: null,
  levelRatio: null,
  statistic: null,
  relative: null,
  unitsAtRisk: null,
  valueAtRisk: null,
});

export type { Severity };
