import { DateTime } from 'luxon';
import type { Alert } from '../contracts/alert.ts';
import { createRng, sampleNegBinomial, sampleNormal, type Rng } from '../stats/random.ts';
import { addDays } from './dates.ts';
import { checkFeed } from './intraday.ts';
import { monitorDay, type MonitorDayResult } from './monitor-day.ts';
import { DEFAULT_MONITORING_SETTINGS, type MonitoringSettings } from './settings.ts';
import { initialMonitorState, type MonitorState } from './state.ts';

// Seeded synthetic location-days for checking monitoring's statistical behaviour (false alerts on stable series,
// detection delay of an injected level shift, a stalled feed and its catch-up). Used by the unit tests at small
// sizes and by scripts/bench/monitoring.ts at large ones. Our own invented scenario: a beverage distributor.

export interface SimSeries {
  readonly item: string;
  /** Mean units a business day and dispersion φ of the daily intake. */
  readonly mean: number;
  readonly phi: number;
  readonly unitPrice?: number;
  /** A slowly wandering level (autocorrelated days): log-level AR(1) with this coefficient and innovation sd. */
  readonly wander?: { readonly rho: number; readonly sd: number };
  /** From this business-day index on, the true level is multiplied by `factor`. */
  readonly shift?: { readonly fromDay: number; readonly factor: number };
}

export interface SimStall {
  /** Business-day index the feed stops on, the local hour it stops, and how many business days it stays down. */
  readonly day: number;
  readonly hour: number;
  readonly days: number;
}

export interface Scenario {
  readonly location: string;
  readonly seed: number;
  readonly businessDays: number;
  readonly series: readonly SimSeries[];
  readonly startDate?: string;
  readonly stall?: SimStall;
  /** Run a feed-health check every hour of business hours (as the runtime's clock records do). */
  readonly hourlyFeedChecks?: boolean;
}

const TZ = 'Europe/Berlin';
const HOURS = { open: '06:00', close: '18:00' } as const;
// Intake by weekday, Monday first: early-week ordering, as a distributor's customers restock after the weekend.
const WEEKDAY_PROFILE = [1.2, 1.1, 1.0, 0.9, 0.8];

export interface SimDay {
  readonly index: number;
  readonly date: string;
  readonly result: MonitorDayResult;
  /** Records of the day's feed checks and close, in order. */
  readonly alerts: readonly Alert[];
}

export function businessDates(start: string, n: number): string[] {
  const out: string[] = [];
  for (let d = start; out.length < n; d = addDays(d, 1)) {
    const wd = DateTime.fromISO(d, { zone: 'utc' }).weekday;
    if (wd <= 5) out.push(d);
  }
  return out;
}

function weekStartOf(date: string): string {
  const wd = DateTime.fromISO(date, { zone: 'utc' }).weekday;
  return addDays(date, 1 - wd);
}

const at = (date: string, clock: string): number => DateTime.fromISO(`${date}T${clock}`, { zone: TZ }).toMillis();

export function runScenario(sc: Scenario, settings: MonitoringSettings = DEFAULT_MONITORING_SETTINGS): SimDay[] {
  const rng: Rng = createRng(sc.seed);
  const dates = businessDates(sc.startDate ?? '2026-01-05', sc.businessDays);
  let state: MonitorState = initialMonitorState(sc.location);
  const days: SimDay[] = [];
  const missing = new Map<string, Array<{ date: string; quantity: number }>>();
  const logLevel = new Map<string, number>();
  let lastRecordMs: number | null = null;
  dates.forEach((date, index) => {
    const wd = DateTime.fromISO(date, { zone: 'utc' }).weekday;
    const profile = WEEKDAY_PROFILE[wd - 1]!;
    const stall = sc.stall;
    const stalledToday = stall !== undefined && index >= stall.day && index < stall.day + stall.days;
    const stallStartToday = stall !== undefined && index === stall.day;
    const resumeToday = stall !== undefined && index === stall.day + stall.days;
    // Share of the day's orders that arrive before the feed stops (orders spread evenly over business hours).
    const arrivedShare = !stalledToday ? 1 : stallStartToday ? Math.max(0, (stall.hour - 6) / 12) : 0;

    const series = sc.series.map((s) => {
      let factor = s.shift && index >= s.shift.fromDay ? s.shift.factor : 1;
      if (s.wander) {
        const u = s.wander.rho * (logLevel.get(s.item) ?? 0) + s.wander.sd * sampleNormal(rng);
        logLevel.set(s.item, u);
        // Centred so the wander does not move the mean level: E[e^u] = e^(var/2) for a normal u (recalled from memory).
        factor *= Math.exp(u - (s.wander.sd * s.wander.sd) / (2 * (1 - s.wander.rho * s.wander.rho)));
      }
      const expected = s.mean * profile;
      const truth = sampleNegBinomial(rng, expected * factor, s.phi);
      const intake = Math.round(truth * arrivedShare);
      if (truth - intake > 0) missing.set(s.item, [...(missing.get(s.item) ?? []), { date, quantity: truth - intake }]);
      const late = resumeToday ? (missing.get(s.item) ?? []) : [];
      return {
        item: s.item,
        intake,
        expectedFromPlan: expected,
        expectedFromBaseline: expected,
        baselineVersion: 1,
        ...(s.unitPrice !== undefined ? { unitPrice: s.unitPrice } : {}),
        ...(late.length > 0 ? { lateIntake: late } : {}),
      };
    });
    if (resumeToday) missing.clear();

    const alerts: Alert[] = [];
    const stopMs = stallStartToday ? at(date, `${String(stall.hour).padStart(2, '0')}:00`) : null;
    const resumeMs = resumeToday ? at(date, '09:00') : null;
    // The last record the runtime knows of at an instant of today.
    const knownAt = (ms: number): number | null => {
      if (stopMs !== null) return Math.min(ms - 60_000, stopMs);
      if (stalledToday) return lastRecordMs;
      if (resumeMs !== null && ms < resumeMs) return lastRecordMs;
      return ms - 60_000;
    };
    if (sc.hourlyFeedChecks) {
      for (let h = 7; h <= 18; h++) {
        const checkMs = at(date, `${String(h).padStart(2, '0')}:00`);
        const r = checkFeed(state, { location: sc.location, atMs: checkMs, timeZone: TZ, lastRecordMs: knownAt(checkMs), isBusinessDay: true, businessHours: HOURS }, settings);
        state = r.state;
        alerts.push(...r.alerts);
      }
    }
    lastRecordMs = knownAt(at(date, '17:56'));
    const result = monitorDay(
      state,
      {
        location: sc.location,
        date,
        weekStart: weekStartOf(date),
        timeZone: TZ,
        isHoliday: false,
        series,
        feed: {
          closedBy: stalledToday ? 'deadline' : 'day-closed',
          ownDeadline: true,
          closeMs: at(addDays(date, 1), '00:30'),
          lastRecordMs,
          businessHours: HOURS,
        },
      },
      settings,
    );
    if (result.outcome !== 'applied') throw new Error(`simulated day ${date} was not applied: ${JSON.stringify(result.rejected)}`);
    state = result.state;
    alerts.push(...result.alerts);
    days.push({ index, date, result, alerts });
  });
  return days;
}

const PAGE_CHANGES = new Set(['opened', 'reopened', 'escalated', 'snooze-ended']);
const SERIES_RULES = new Set(['spike', 'drop', 'shift-up', 'shift-down']);

export interface ScenarioFigures {
  readonly seriesDays: number;
  /** Series-level alerts opened or re-opened on unshifted series-days, per 100 series-days (before grouping and budget). */
  readonly falseAlertsPer100: number;
  readonly falseAlerts: number;
  /** Most pages on one location-day. */
  readonly maxPagesPerDay: number;
  /** Per shifted series: business days from the shift to the first alerting signal in its direction (inclusive). */
  readonly delays: ReadonlyArray<{ readonly item: string; readonly mean: number; readonly phi: number; readonly delay: number }>;
}

/** Counts over the days from `warmUp` on (the first days let the noise estimates settle). */
export function figures(sc: Scenario, days: readonly SimDay[], warmUp = 0): ScenarioFigures {
  const shiftOf = new Map(sc.series.map((s) => [s.item, s.shift]));
  let seriesDays = 0;
  let falseAlerts = 0;
  let maxPages = 0;
  for (const d of days) {
    if (d.index < warmUp) continue;
    for (const s of sc.series) if (!s.shift || d.index < s.shift.fromDay) seriesDays++;
    for (const r of d.alerts) {
      if (r.scope !== 'series' || !SERIES_RULES.has(r.rule) || (r.change !== 'opened' && r.change !== 'reopened')) continue;
      const sh = shiftOf.get(r.item);
      if (!sh || d.index < sh.fromDay) falseAlerts++;
    }
    maxPages = Math.max(maxPages, d.alerts.filter((r) => r.delivery === 'page' && PAGE_CHANGES.has(r.change)).length);
  }
  const delays = sc.series
    .filter((s) => s.shift)
    .map((s) => {
      const dir = s.shift!.factor >= 1 ? 'up' : 'down';
      const hit = days.find((d) => d.index >= s.shift!.fromDay && d.result.digest!.signals.some((g) => g.item === s.item && g.direction === dir && g.alertId !== null));
      return { item: s.item, mean: s.mean, phi: s.phi, delay: hit ? hit.index - s.shift!.fromDay + 1 : Infinity };
    });
  return { seriesDays, falseAlerts, falseAlertsPer100: seriesDays > 0 ? (100 * falseAlerts) / seriesDays : 0, maxPagesPerDay: maxPages, delays };
}

export function median(values: readonly number[]): number {
  const v = [...values].sort((a, b) => a - b);
  if (v.length === 0) return NaN;
  const m = Math.floor(v.length / 2);
  return v.length % 2 === 1 ? v[m]! : (v[m - 1]! + v[m]!) / 2;
}

/** A location of `n` stable or shifted series with means drawn log-uniformly from [lo, hi] and φ uniformly from [phiLo, phiHi]. */
export function makeSeries(
  seed: number,
  n: number,
  range: { readonly lo: number; readonly hi: number; readonly phiLo?: number; readonly phiHi?: number; readonly wander?: SimSeries['wander'] },
  shift?: { readonly factor: number; readonly fromDayLo: number; readonly fromDayHi: number; readonly share?: number },
): SimSeries[] {
  const rng = createRng(seed);
  const out: SimSeries[] = [];
  for (let i = 0; i < n; i++) {
    const mean = range.lo * (range.hi / range.lo) ** rng.next();
    const phi = (range.phiLo ?? 0) + ((range.phiHi ?? 0) - (range.phiLo ?? 0)) * rng.next();
    const shifted = shift !== undefined && rng.next() < (shift.share ?? 1);
    const fromDay = shift ? shift.fromDayLo + Math.floor(rng.next() * (shift.fromDayHi - shift.fromDayLo + 1)) : 0;
    out.push({
      item: `ITEM-${String(i).padStart(4, '0')}`,
      mean,
      phi,
      ...(range.wander ? { wander: range.wander } : {}),
      ...(shifted ? { shift: { fromDay, factor: shift.factor } } : {}),
    });
  }
  return out;
}
