import type { AlertRule } from '../contracts/alert.ts';
import { apply, openAlert, type DayContext } from './day-context.ts';
import { isActive, severityRank, type Severity } from './lifecycle.ts';
import type { SeriesEval } from './series-evaluation.ts';
import { passesFloor, severityOf } from './severity.ts';
import type { AlertEntry, Direction, Measure, SeriesState } from './state.ts';

// Turns one series' evaluated day into lifecycle events. A series has at most one episode per direction: a spike
// followed by a CUSUM signal is the same departure and stays one alert (its firedRules name both). Plan divergence
// is its own episode.

export interface SeriesDayFacts {
  readonly ev: SeriesEval;
  /** The point test is a discovery after Benjamini–Hochberg across the location's series today. */
  readonly discovery: boolean;
  readonly qValue: number | null;
  /** Drops are held back (holiday, feed trouble). */
  readonly held: boolean;
}

export interface FiredSignal {
  readonly item: string;
  readonly rule: AlertRule;
  readonly direction: Direction | null;
  /** The alert the signal went to; null when it stayed below the value floor. */
  readonly alertId: string | null;
}

interface Candidate {
  readonly rule: AlertRule;
  readonly measure: Measure;
  readonly severity: Severity;
  readonly floorOk: boolean;
  readonly start: string;
  readonly customer: string | null;
}

export interface SeriesOutcome {
  readonly signals: FiredSignal[];
  readonly belowFloor: number;
  readonly heldBackDrop: boolean;
  readonly firedUp: boolean;
  readonly firedDown: boolean;
}

export function decideSeries(ctx: DayContext, series: SeriesState, f: SeriesDayFacts): SeriesOutcome {
  const { ev } = f;
  const { alpha, inControlAlpha } = ctx.settings.point;
  const t = ev.point?.test;
  const spike = f.discovery && t !== undefined && t.pUpper <= alpha / 2;
  const dropSeen = f.discovery && t !== undefined && t.pLower <= alpha / 2;
  const drop = dropSeen && !f.held;
  const shiftUp = ev.shift?.signal === 'up';
  const shiftDown = ev.shift?.signal === 'down';

  const up: Candidate[] = [];
  const down: Candidate[] = [];
  if (spike) up.push(pointCandidate(ctx, ev, 'spike', f.qValue, ev.customerUp));
  if (shiftUp) up.push(shiftCandidate(ctx, ev, 'shift-up', ev.customerUp));
  if (drop) down.push(pointCandidate(ctx, ev, 'drop', f.qValue, ev.customerDown));
  if (shiftDown) down.push(shiftCandidate(ctx, ev, 'shift-down', ev.customerDown));

  const signals: FiredSignal[] = [];
  let belowFloor = 0;
  const inControlUp = up.length === 0 && (t === undefined || t.pUpper > inControlAlpha / 2);
  const inControlDown = down.length === 0 && !f.held && (t === undefined || t.pLower > inControlAlpha / 2);
  for (const [dir, cands, inControl] of [
    ['up', up, inControlUp],
    ['down', down, inControlDown],
  ] as const) {
    if (cands.length > 0) {
      const alertId = onDirectionSignal(ctx, series, ev.day.item, dir, cands);
      if (alertId === null) belowFloor++;
      for (const c of cands) signals.push({ item: ev.day.item, rule: c.rule, direction: dir, alertId });
    } else if (inControl) {
      onInControl(ctx, series.active[dir]);
    }
  }

  const div = divergenceStep(ctx, series, ev);
  if (div) {
    signals.push(div.signal);
    if (div.signal.alertId === null) belowFloor++;
  }
  return { signals, belowFloor, heldBackDrop: dropSeen && f.held, firedUp: up.length > 0, firedDown: down.length > 0 };
}

/** A series missing from today's input sent nothing to deviate: its open episodes count an in-control day. */
export function absentSeriesDay(ctx: DayContext, series: SeriesState): void {
  onInControl(ctx, series.active.up);
  onInControl(ctx, series.active.down);
  onInControl(ctx, series.active.divergence);
}

function onDirectionSignal(ctx: DayContext, series: SeriesState, item: string, dir: Direction, cands: Candidate[]): string | null {
  const passing = cands.filter((c) => c.floorOk).sort((a, b) => severityRank(b.severity) - severityRank(a.severity));
  const best = passing[0] ?? null;
  const id = series.active[dir];
  const entry = id ? ctx.state.alerts[id] : undefined;
  const rules = cands.map((c) => c.rule);
  if (entry && isActive(entry.life)) {
    signalEntry(ctx, entry, best ?? cands[0]!, best !== null, rules);
    return entry.alertId;
  }
  if (entry && entry.life.closedByPerson) {
    // Below the floor it can only keep the person's resolution standing, never bring it back.
    const result = signalEntry(ctx, entry, best ?? cands[0]!, best !== null, rules);
    if (!result.newEpisode) return best ? entry.alertId : null;
  } else if (entry && best) {
    const result = signalEntry(ctx, entry, best, true, rules);
    if (!result.newEpisode) return entry.alertId;
  }
  if (!best) return null;
  const opened = openAlert(ctx, {
    scope: 'series',
    rule: best.rule,
    item,
    customer: best.customer,
    direction: dir,
    episodeStart: best.start,
    severity: best.severity,
    measure: best.measure,
    members: [`${ctx.state.location}|${item}`],
  });
  opened.firedRules = [...new Set(rules)];
  series.active[dir] = opened.alertId;
  return opened.alertId;
}

function signalEntry(ctx: DayContext, entry: AlertEntry, c: Candidate, countsAsWorse: boolean, rules: AlertRule[]): { newEpisode: boolean } {
  const severity: Severity = countsAsWorse ? c.severity : 'low';
  const before = { measure: entry.measure, firedRules: entry.firedRules, customer: entry.customer };
  // The record of a change shows today's evidence.
  entry.measure = { ...c.measure };
  entry.firedRules = [...new Set([...entry.firedRules, ...rules])];
  if (c.customer !== null) entry.customer = c.customer;
  const result = apply(ctx, entry, { kind: 'signal', on: ctx.on, severity });
  if (result.newEpisode) Object.assign(entry, before);
  return { newEpisode: result.newEpisode === true };
}

function onInControl(ctx: DayContext, id: string | null): void {
  const entry = id ? ctx.state.alerts[id] : undefined;
  if (entry) apply(ctx, entry, { kind: 'in-control', on: ctx.on });
}

function price(ev: SeriesEval): number | null {
  return ev.day.unitPrice ?? null;
}

function pointCandidate(ctx: DayContext, ev: SeriesEval, rule: 'spike' | 'drop', qValue: number | null, customer: string | null): Candidate {
  const p = ev.point!;
  const units = Math.abs(ev.day.intake - p.mean);
  const relative = units / p.mean;
  const unitPrice = price(ev);
  const valueAtRisk = unitPrice === null ? null : units * unitPrice;
  const measure: Measure = {
    observed: ev.day.intake,
    expected: p.mean,
    lower: p.test.lower,
    upper: p.test.upper,
    pValue: p.test.pTwoSided,
    qValue,
    levelRatio: null,
    statistic: null,
    relative,
    unitsAtRisk: units,
    valueAtRisk,
  };
  return {
    rule,
    measure,
    severity: severityOf(relative, valueAtRisk, ctx.settings.severity),
    floorOk: passesFloor(units, relative, valueAtRisk, ctx.settings.floor),
    start: ctx.on,
    customer,
  };
}

function shiftCandidate(ctx: DayContext, ev: SeriesEval, rule: 'shift-up' | 'shift-down', customer: string | null): Candidate {
  const sh = ev.shift!;
  // Sized against the baseline, not the previous level: a return to the baseline is not a new departure.
  const relative = Math.abs(sh.levelAfter - 1);
  const units = relative * sh.baseline * ctx.settings.floor.valueHorizonDays;
  const unitPrice = price(ev);
  const valueAtRisk = unitPrice === null ? null : units * unitPrice;
  const measure: Measure = {
    observed: ev.day.intake,
    expected: sh.baseline,
    lower: null,
    upper: null,
    pValue: null,
    qValue: null,
    levelRatio: sh.levelAfter,
    statistic: sh.statistic,
    relative,
    unitsAtRisk: units,
    valueAtRisk,
  };
  const towardBaseline = rule === 'shift-up' ? sh.levelAfter > 1 : sh.levelAfter < 1;
  return {
    rule,
    measure,
    severity: severityOf(relative, valueAtRisk, ctx.settings.severity),
    floorOk: towardBaseline && passesFloor(units, relative, valueAtRisk, ctx.settings.floor),
    start: sh.runStart ?? ctx.on,
    customer,
  };
}

function divergenceStep(ctx: DayContext, series: SeriesState, ev: SeriesEval): { signal: FiredSignal } | null {
  const d = ev.divergence;
  if (!d) return null;
  const { minRatio, resolveFraction } = ctx.settings.divergence;
  const gap = Math.abs(d.ratio - 1);
  const firing = gap >= minRatio && d.outsideBand;
  const id = series.active.divergence;
  const entry = id ? ctx.state.alerts[id] : undefined;
  if (!firing) {
    if (gap < minRatio * resolveFraction || !d.outsideBand) onInControl(ctx, id);
    return null;
  }
  const unitPrice = price(ev);
  const valueAtRisk = unitPrice === null ? null : d.units * unitPrice;
  const measure: Measure = {
    observed: d.adjusted,
    expected: d.baseline,
    lower: ev.day.planLead?.lower ?? null,
    upper: ev.day.planLead?.upper ?? null,
    pValue: null,
    qValue: null,
    levelRatio: d.ratio,
    statistic: null,
    relative: gap,
    unitsAtRisk: d.units,
    valueAtRisk,
  };
  const cand: Candidate = {
    rule: 'plan-divergence',
    measure,
    severity: severityOf(gap, valueAtRisk, ctx.settings.severity),
    floorOk: passesFloor(d.units, gap, valueAtRisk, ctx.settings.floor),
    start: ctx.on,
    customer: null,
  };
  const item = ev.day.item;
  if (entry && (isActive(entry.life) || entry.life.closedByPerson || cand.floorOk)) {
    const r = signalEntry(ctx, entry, cand, cand.floorOk, ['plan-divergence']);
    if (!r.newEpisode) return { signal: { item, rule: 'plan-divergence', direction: null, alertId: isActive(entry.life) || cand.floorOk ? entry.alertId : null } };
  }
  if (!cand.floorOk) return { signal: { item, rule: 'plan-divergence', direction: null, alertId: null } };
  const opened = openAlert(ctx, {
    scope: 'series',
    rule: 'plan-divergence',
    item,
    customer: null,
    direction: null,
    episodeStart: ctx.on,
    severity: cand.severity,
    measure,
    members: [`${ctx.state.location}|${item}`],
  });
  series.active.divergence = opened.alertId;
  return { signal: { item, rule: 'plan-divergence', direction: null, alertId: opened.alertId } };
}
