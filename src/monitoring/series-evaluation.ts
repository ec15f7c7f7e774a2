import { countTest, normalScore, type CountTest } from './count-test.ts';
import { CUSUM_START, cusumStep } from './cusum.ts';
import type { SeriesDay } from './day-input.ts';
import { ewmaSignal, ewmaStep } from './ewma.ts';
import { bandOf, dispersionOf, seriesDispersionOf, varianceFactorOf, type NoisePool } from './noise.ts';
import type { MonitoringSettings } from './settings.ts';
import type { Direction, SeriesState } from './state.ts';

// One series on one closed day: the exact point test against the plan's expectation, one step of the shift
// statistic against the re-centred baseline, the plan-divergence condition and which customer carries the
// deviation. The series state is updated here (shift statistic, re-centring); alert decisions are made later,
// once the location's false-discovery control has seen every series.

export interface PointEval {
  readonly mean: number;
  readonly phi: number;
  readonly test: CountTest;
}

export interface ShiftEval {
  /** Baseline intake × the level before today's step. */
  readonly expected: number;
  readonly baseline: number;
  readonly phi: number;
  /** Today's normal score, before the long-run variance factor. */
  readonly score: number;
  readonly signal: Direction | null;
  readonly levelAfter: number;
  /** CUSUM sum (σ units) or EWMA value at the signal. */
  readonly statistic: number;
  /** First date of the run that signalled (the estimated start of the shift). */
  readonly runStart: string | null;
}

export interface DivergenceEval {
  readonly ratio: number;
  readonly outsideBand: boolean;
  readonly units: number;
  readonly baseline: number;
  readonly adjusted: number;
}

export interface SeriesEval {
  readonly day: SeriesDay;
  readonly casePack: number;
  readonly point: PointEval | null;
  readonly shift: ShiftEval | null;
  readonly divergence: DivergenceEval | null;
  /** The customer carrying most of an upward / downward deviation, if one does. */
  readonly customerUp: string | null;
  readonly customerDown: string | null;
}

export function evaluateSeries(
  series: SeriesState,
  day: SeriesDay,
  noise: { point: NoisePool; shift: NoisePool },
  held: boolean,
  on: string,
  s: MonitoringSettings,
): SeriesEval {
  const casePack = day.casePack ?? 1;
  const point = pointTest(series, day, noise.point, casePack, s);
  // Held days (holiday, feed trouble) say nothing reliable about the level: the shift statistic skips them.
  const shift = held ? null : shiftStep(series, day, noise.shift, casePack, on, s);
  const { up, down } = attribute(series, day, point?.mean ?? null, s);
  return { day, casePack, point, shift, divergence: divergence(day), customerUp: up, customerDown: down };
}

function pointTest(series: SeriesState, day: SeriesDay, pool: NoisePool, casePack: number, s: MonitoringSettings): PointEval | null {
  const mean = day.expectedFromPlan ?? (day.expectedFromBaseline === null ? null : day.expectedFromBaseline * series.level);
  if (mean === null || mean < s.point.minExpected) return null;
  const phi = seriesDispersionOf(series.dispersion.point, dispersionOf(pool, bandOf(mean), s.noise, day.dispersion), s.noise);
  return { mean, phi, test: countTest(day.intake, mean, phi, s.point.alpha, casePack) };
}

function shiftStep(series: SeriesState, day: SeriesDay, pool: NoisePool, casePack: number, on: string, s: MonitoringSettings): ShiftEval | null {
  const b = day.expectedFromBaseline;
  if (b === null) return null;
  const expected = b * series.level;
  if (expected < s.point.minExpected) return null;
  const band = bandOf(expected);
  const phi = seriesDispersionOf(series.dispersion.shift, dispersionOf(pool, band, s.noise, day.dispersion), s.noise);
  const score = normalScore(day.intake, expected, phi, casePack);
  const clip = s.shift.clipZ;
  const z = Math.max(-clip, Math.min(clip, score / Math.sqrt(varianceFactorOf(pool, band, s.noise))));
  // The level is re-centred on intake winsorised at twice that bound: one odd day in a run cannot set the new level,
  // while a real large step (every day far out) is still measured nearly in full.
  const sd = Math.sqrt(expected * casePack + phi * expected * expected);
  const x = Math.max(expected - 2 * clip * sd, Math.min(expected + 2 * clip * sd, day.intake));
  const base = { expected, baseline: b, phi, score };

  if (s.shift.statistic === 'ewma') {
    const lambda = s.shift.lambda;
    series.ewma = ewmaStep(series.ewma, z, lambda);
    series.ewmaX = series.ewma.t === 1 ? x : lambda * x + (1 - lambda) * series.ewmaX;
    series.ewmaMu = series.ewma.t === 1 ? expected : lambda * expected + (1 - lambda) * series.ewmaMu;
    const signal = ewmaSignal(series.ewma, 0, 1, lambda, s.shift.L);
    const statistic = series.ewma.z;
    if (signal === null) return { ...base, signal, levelAfter: series.level, statistic, runStart: null };
    const levelAfter = recentre(series, series.ewmaX, series.ewmaMu);
    return { ...base, signal, levelAfter, statistic, runStart: null };
  }

  const { k, h } = s.shift;
  const prev = series.cusum;
  const stepped = cusumStep(prev, z, 0, k, h);
  const run = series.run;
  // Intake and expectation over each side's current run give the level to re-centre on after a signal.
  if (stepped.state.hi > 0) {
    if (prev.hi === 0) Object.assign(run, { hiX: 0, hiMu: 0, hiStart: on });
    run.hiX += x;
    run.hiMu += expected;
  }
  if (stepped.state.lo > 0) {
    if (prev.lo === 0) Object.assign(run, { loX: 0, loMu: 0, loStart: on });
    run.loX += x;
    run.loMu += expected;
  }
  series.cusum = stepped.state;
  if (stepped.signal === null) return { ...base, signal: null, levelAfter: series.level, statistic: Math.max(stepped.state.hi, stepped.state.lo), runStart: null };
  const up = stepped.signal === 'up';
  const statistic = up ? stepped.state.hi : stepped.state.lo;
  const runStart = (up ? run.hiStart : run.loStart) ?? on;
  const levelAfter = recentre(series, up ? run.hiX : run.loX, up ? run.hiMu : run.loMu);
  return { ...base, signal: stepped.signal, levelAfter, statistic, runStart };
}

/** Re-centres the shift statistic on the level seen over the signalling run, so one shift makes one episode. */
function recentre(series: SeriesState, sumX: number, sumMu: number): number {
  if (sumMu > 0) series.level = Math.min(LEVEL_MAX, Math.max(LEVEL_MIN, series.level * (sumX / sumMu)));
  series.cusum = CUSUM_START;
  series.run = { hiX: 0, hiMu: 0, loX: 0, loMu: 0 };
  series.ewma = { z: 0, t: 0 };
  return series.level;
}

const LEVEL_MIN = 0.02;
const LEVEL_MAX = 50;

function divergence(day: SeriesDay): DivergenceEval | null {
  const p = day.planLead;
  if (!p || p.baseline <= 0) return null;
  return {
    ratio: p.adjusted / p.baseline,
    outsideBand: p.baseline < p.lower || p.baseline > p.upper,
    units: Math.abs(p.adjusted - p.baseline),
    baseline: p.baseline,
    adjusted: p.adjusted,
  };
}

function attribute(series: SeriesState, day: SeriesDay, mean: number | null, s: MonitoringSettings): { up: string | null; down: string | null } {
  if (!day.byCustomer || mean === null) return { up: null, down: null };
  const deviation = day.intake - mean;
  const today = new Map(day.byCustomer.map((c) => [c.customer, c.intake]));
  let best: { id: string; d: number } | null = null;
  let worst: { id: string; d: number } | null = null;
  for (const id of new Set([...today.keys(), ...Object.keys(series.customers)])) {
    const d = (today.get(id) ?? 0) - (series.customers[id] ?? 0);
    if (!best || d > best.d || (d === best.d && id < best.id)) best = { id, d };
    if (!worst || d < worst.d || (d === worst.d && id < worst.id)) worst = { id, d };
  }
  const share = s.group.customerShare;
  return {
    up: deviation > 0 && best && best.d >= share * deviation ? best.id : null,
    down: deviation < 0 && worst && worst.d <= share * deviation ? worst.id : null,
  };
}

/** Learns each customer's usual daily intake on an unremarkable day; keeps the largest few. */
export function learnCustomers(series: SeriesState, day: SeriesDay, s: MonitoringSettings): void {
  if (!day.byCustomer) return;
  const a = s.group.customerSmoothing;
  const today = new Map(day.byCustomer.map((c) => [c.customer, c.intake]));
  for (const id of new Set([...today.keys(), ...Object.keys(series.customers)])) {
    const prev = series.customers[id];
    series.customers[id] = prev === undefined ? (today.get(id) ?? 0) : prev + a * ((today.get(id) ?? 0) - prev);
  }
  const kept = Object.entries(series.customers)
    .sort((x, y) => y[1] - x[1] || (x[0] < y[0] ? -1 : 1))
    .slice(0, s.group.maxCustomersPerSeries);
  series.customers = Object.fromEntries(kept);
}
