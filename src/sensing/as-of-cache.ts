import type { LocationCalendar } from '../calendar/location-calendar.ts';
import { asOfSignals, trainingPart, type TrainingSignals } from './as-of-signals.ts';
import { weekStartOf } from '../calendar/weeks.ts';
import { knowledgeStamp, knownSince, trimKnowledgeLog } from './knowledge-log.ts';
import { LAG_UNKNOWN } from './line-parts.ts';
import type { LocationState } from './location-state.ts';
import type { RecomputeContext } from './recompute-context.ts';
import type { SeriesInput } from './series-input.ts';
import type { SensingSettings } from './settings.ts';

// The signals of a past as-of day D are computed from what was known by the end of D (see as-of-signals.ts), so
// once computed they hold until a record known on or before D arrives. A close therefore computes the signals of
// its own day and takes the 17 older as-of days it trains on from earlier closes. Kept signals are used only when a
// fresh computation would give the same numbers: same settings, calendar and shipment lag, the same input series
// with the same first-activity days, and no late record since; anything else computes them again. A prune keeps
// most of them: it drops only rows no training window reads, and the series remember their first activity across
// it; but the rows left can be judged anew (a customer's first remaining line now looks like a first fill, a line's
// size is weighed against a shorter history), and the days whose windows read those rows are computed again.

/** The input series of a close and their first-activity days: kept signals are per input index. */
interface Layout {
  readonly items: readonly string[];
  readonly first: Float64Array;
}

interface Kept {
  readonly stamp: number;
  readonly settings: SensingSettings;
  readonly calendar: LocationCalendar;
  readonly lag: number;
  readonly layout: Layout;
  readonly signals: TrainingSignals;
}

const kept = new WeakMap<LocationState, Map<number, Kept>>();
const counts = new WeakMap<LocationState, { reused: number; computed: number }>();

function count(state: LocationState, reused: boolean): void {
  let c = counts.get(state);
  if (!c) {
    c = { reused: 0, computed: 0 };
    counts.set(state, c);
  }
  if (reused) c.reused++;
  else c.computed++;
}

/** How often past as-of signals were reused or computed for this location (benchmarks and tests). */
export function keptSignalCounts(state: LocationState): { readonly reused: number; readonly computed: number } {
  const c = counts.get(state);
  return { reused: c?.reused ?? 0, computed: c?.computed ?? 0 };
}

// One layout object per distinct layout: the closes of a location share it while its series stay the same, so
// checking a kept entry is one comparison and the days kept do not each hold a copy.
const lastLayout = new WeakMap<LocationState, Layout>();
const layoutOfInputs = new WeakMap<readonly SeriesInput[], Layout>();

function sameLayout(a: Layout, inputs: readonly SeriesInput[]): boolean {
  if (a.items.length !== inputs.length) return false;
  for (let i = 0; i < inputs.length; i++) {
    if (a.items[i] !== inputs[i]!.item || !Object.is(a.first[i], inputs[i]!.frame.firstActivityDay ?? NaN)) return false;
  }
  return true;
}

function layoutOf(state: LocationState, inputs: readonly SeriesInput[]): Layout {
  const known = layoutOfInputs.get(inputs);
  if (known) return known;
  const prev = lastLayout.get(state);
  const layout =
    prev && sameLayout(prev, inputs) ? prev : { items: inputs.map((x) => x.item), first: Float64Array.from(inputs, (x) => x.frame.firstActivityDay ?? NaN) };
  lastLayout.set(state, layout);
  layoutOfInputs.set(inputs, layout);
  return layout;
}

function stillValid(k: Kept, state: LocationState, inputs: readonly SeriesInput[], ctx: RecomputeContext, lag: number, day: number): boolean {
  if (k.settings !== ctx.settings || k.calendar !== ctx.cal || k.lag !== lag || k.layout !== layoutOf(state, inputs)) return false;
  return !knownSince(state, k.stamp, day);
}

function keep(state: LocationState, inputs: readonly SeriesInput[], ctx: RecomputeContext, lag: number, day: number, signals: TrainingSignals): void {
  let byDay = kept.get(state);
  if (!byDay) {
    byDay = new Map();
    kept.set(state, byDay);
  }
  byDay.set(day, {
    stamp: knowledgeStamp(state, day),
    settings: ctx.settings,
    calendar: ctx.cal,
    lag,
    layout: layoutOf(state, inputs),
    signals,
  });
  // Plan dates only move forward: no later close trains on days older than this one's oldest as-of day.
  const oldest = ctx.planDay - 7 * ctx.J;
  let minStamp = Infinity;
  for (const [d, k] of byDay) {
    if (d < oldest) byDay.delete(d);
    else minStamp = Math.min(minStamp, k.stamp);
  }
  trimKnowledgeLog(state, minStamp);
}

/** Signals at as-of index j ≥ 1 (plan date − 7j): kept ones when still exact, else computed and kept. */
export function pastSignals(state: LocationState, inputs: readonly SeriesInput[], ctx: RecomputeContext, j: number, lag: number): TrainingSignals {
  const day = ctx.planDay - 7 * j;
  const hit = kept.get(state)?.get(day);
  if (hit && stillValid(hit, state, inputs, ctx, lag, day)) {
    count(state, true);
    return hit.signals;
  }
  count(state, false);
  const signals = trainingPart(asOfSignals(inputs, ctx, j), ctx.settings.maxLead + 1);
  // The knowledge instant is past the end of day D, so these are D's final signals.
  keep(state, inputs, ctx, lag, day, signals);
  return signals;
}

/**
 * Keeps the plan date's own signals for later closes, when they are already that day's final ones: nothing in
 * the state known on the plan date lies after the knowledge instant (a close at 23:00 may not have seen it all).
 */
export function keepLiveSignals(state: LocationState, inputs: readonly SeriesInput[], ctx: RecomputeContext, lag: number, live: TrainingSignals): void {
  for (const x of inputs) {
    if (x.frame.knownAfterCutoffDay <= ctx.planDay) return;
    for (const b of x.series.baselines) if (b.knownMs > ctx.cutoffMs && b.knownDay <= ctx.planDay) return;
  }
  keep(state, inputs, ctx, lag, ctx.planDay, live);
}

/**
 * After a prune: forgets the kept days whose recent windows reach a row judged differently since (requested on or
 * before `rejudgedUpTo`; +Infinity forgets every day, −Infinity none). The windows read weeks by requested day,
 * moved by the shipment lag on the shipments basis.
 */
export function forgetKeptSignalsReading(state: LocationState, rejudgedUpTo: number): void {
  const byDay = kept.get(state);
  if (!byDay || rejudgedUpTo === -Infinity) return;
  for (const [day, k] of byDay) {
    const s = k.settings;
    const windows = Math.max(s.recentWeeks, s.bookProfileWeeks, s.smallSeriesWeeks, s.runRateWeeks);
    const oldestRead = weekStartOf(day, k.calendar.weekStart) - 7 * windows;
    const shift = k.lag !== LAG_UNKNOWN && k.lag > 0 ? k.lag : 0;
    if (oldestRead <= rejudgedUpTo + shift) byDay.delete(day);
  }
}
