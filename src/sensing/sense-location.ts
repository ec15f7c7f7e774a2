import { formatDay } from '../calendar/day-number.ts';
import type { ManifestModel } from '../contracts/manifest.ts';
import { PLAN_SCHEMA_VERSION, type Plan, type PlanLead } from '../contracts/plan.ts';
import { VOLUME_BANDS } from '../stats/volume-band.ts';
import { applyLead, type LeadOutcome } from './apply-lead.ts';
import { Arena, FRESH_ARRAYS, type ScratchArrays } from './arena.ts';
import { keepLiveSignals, pastSignals } from './as-of-cache.ts';
import { asOfSignals, trainingPart, type AsOfSignals, type TrainingSignals } from './as-of-signals.ts';
import { dailySplit } from './daily-split.ts';
import { flatProfile, normalise, seriesProfiles, weekdaySums } from './day-profiles.ts';
import { FEATURE_NAMES } from './features.ts';
import { intakeProfile, type IntakeProfile } from './intake-profile.ts';
import { fitLeadModel, type LeadModel } from './lead-model.ts';
import { LAG_UNKNOWN, seriesParts } from './line-parts.ts';
import type { LocationState } from './location-state.ts';
import { dayIntake, expectedIntake, type MonitoringInput } from './monitoring-inputs.ts';
import { cumulativeQuantiles, leadQuantiles } from './quantiles.ts';
import { recomputeContext, type AsOf, type RecomputeContext } from './recompute-context.ts';
import { prepareSeries, type SeriesInput } from './series-input.ts';
import { DEFAULT_SENSING_SETTINGS, type SensingSettings } from './settings.ts';
import { survivalByLead } from './survival.ts';
import { trainingRows } from './training-rows.ts';

export interface SenseOptions {
  /** Leads that src/accuracy's self-check decided to hand back to the baseline at this location. */
  readonly selfCheckFallbacks?: Iterable<number>;
  /** The plans published at the previous close: they set `moved`/`largestMove` and the plan-implied intake. */
  readonly previousPlans?: readonly Plan[];
  /** Revision written into the plans (the runtime sets it; default 1). */
  readonly revision?: number;
}

export interface SenseResult {
  /** One plan per active series (item order), all leads. */
  readonly plans: Plan[];
  /** Per lead: the model behind the plans, for the manifest. */
  readonly model: ManifestModel[];
  /** Per active series: the day's intake and its expectations, for deviation monitoring. */
  readonly monitoringInputs: MonitoringInput[];
}

/** Everything computed for a location at one as-of moment, kept for tests and explanations. */
export interface SenseWork {
  readonly ctx: RecomputeContext;
  readonly inputs: SeriesInput[];
  /** Signals at the plan date (index 0 of `signals`, with the per-week windows the plans are built from). */
  readonly live: AsOfSignals;
  /** Signals at as-of index j (plan date − 7j), j = 0 … J: what training rows read. */
  readonly signals: TrainingSignals[];
  readonly models: LeadModel[];
}

function medianLag(state: LocationState, settings: SensingSettings, cutoffMs: number): number {
  if (settings.demandBasis !== 'shipments') return 0;
  const lags: number[] = [];
  for (const s of state.series.values()) {
    const sh = seriesParts(s, settings, state.calendar.weekStart).shipments;
    for (let i = 0; i < sh.n; i++) if (sh.knownMs[i]! <= cutoffMs && sh.lagDays[i] !== LAG_UNKNOWN) lags.push(sh.lagDays[i]!);
  }
  if (lags.length === 0) return 0;
  lags.sort((a, b) => a - b);
  return Math.max(0, Math.min(28, lags[lags.length >> 1]!));
}

/** Scratch space of one recompute: series frames live through it, training rows through one lead's fit. */
interface Scratch {
  readonly frames: ScratchArrays;
  /** Called before each lead's training rows: the previous lead's may be overwritten. */
  readonly rows: () => ScratchArrays;
}

const FRESH_SCRATCH: Scratch = { frames: FRESH_ARRAYS, rows: () => FRESH_ARRAYS };

// Each location keeps its scratch blocks from one close to the next (see arena.ts). Nothing senseLocation returns is
// a view into them; senseWork, which returns the frames themselves, allocates its own.
const arenas = new WeakMap<LocationState, { frames: Arena; rows: Arena }>();

function scratchOf(state: LocationState): Scratch {
  let a = arenas.get(state);
  if (!a) {
    a = { frames: new Arena(), rows: new Arena() };
    arenas.set(state, a);
  }
  const { frames, rows } = a;
  frames.reset();
  return {
    frames,
    rows: () => {
      rows.reset();
      return rows;
    },
  };
}

/** Fits the location's models at the as-of moment (shared by senseLocation and the tests' feature checks). */
export function senseWork(state: LocationState, asOf: AsOf, settings: SensingSettings = DEFAULT_SENSING_SETTINGS): SenseWork {
  return senseWorkIn(state, asOf, settings, FRESH_SCRATCH);
}

function senseWorkIn(state: LocationState, asOf: AsOf, settings: SensingSettings, scratch: Scratch): SenseWork {
  const ctx = recomputeContext(state.calendar, asOf, settings);
  const lag = medianLag(state, settings, ctx.cutoffMs);
  const inputs: SeriesInput[] = [];
  for (const item of [...state.series.keys()].sort()) {
    const series = state.series.get(item)!;
    const parts = seriesParts(series, settings, state.calendar.weekStart);
    const input = prepareSeries(item, series, parts, ctx, lag, scratch.frames);
    if (isActive(input, ctx)) inputs.push(input);
  }
  const live = asOfSignals(inputs, ctx, 0);
  const liveColumns = trainingPart(live, settings.maxLead + 1);
  keepLiveSignals(state, inputs, ctx, lag, liveColumns);
  const signals: TrainingSignals[] = [liveColumns];
  for (let j = 1; j <= ctx.J; j++) signals.push(pastSignals(state, inputs, ctx, j, lag));
  const survival = survivalByLead(inputs, ctx);
  const models: LeadModel[] = [];
  for (let L = 0; L <= settings.maxLead; L++) models.push(fitLeadModel(trainingRows(inputs, signals, ctx, L, scratch.rows()), survival[L]!, ctx));
  return { ctx, inputs, live, signals, models };
}

/** A series is active when it has a baseline for a planned week, or anything known in the frame. */
function isActive(input: SeriesInput, ctx: RecomputeContext): boolean {
  if (input.ref[0] && input.ref[0].weeks.some((w) => w >= ctx.week0 && w <= ctx.week0 + 7 * ctx.settings.maxLead)) return true;
  const f = input.frame;
  for (let d = 0; d < ctx.nDays; d++) if (f.dayDemand[d] !== 0 || f.dayIntake[d] !== 0) return true;
  return false;
}

/**
 * The sensing engine's entry: for one location at one as-of moment (plan date + knowledge instant), one adjusted
 * plan per active series with every lead, the model summary for the manifest, and monitoring's inputs. Pure: reads
 * no clock and changes nothing in the state.
 */
export function senseLocation(
  state: LocationState,
  asOf: AsOf,
  settings: SensingSettings = DEFAULT_SENSING_SETTINGS,
  options: SenseOptions = {},
): SenseResult {
  const work = senseWorkIn(state, asOf, settings, scratchOf(state));
  const { ctx, inputs, live, models } = work;
  const selfCheck = new Set(options.selfCheckFallbacks ?? []);
  const previous = new Map((options.previousPlans ?? []).map((p) => [p.item as string, p]));

  const demandSums = new Float64Array(8);
  const intakeSums = new Float64Array(8);
  const pooledOrdered = new Float64Array((settings.maxLead + 1) * 8);
  let pooledIntakeDemand = 0;
  const ownProfiles: IntakeProfile[] = [];
  for (const input of inputs) {
    const a = weekdaySums(input.frame.dayDemand, ctx);
    const b = weekdaySums(input.frame.dayIntake, ctx);
    for (let wd = 1; wd <= 7; wd++) {
      demandSums[wd] = demandSums[wd]! + a[wd]!;
      intakeSums[wd] = intakeSums[wd]! + b[wd]!;
    }
    const own = intakeProfile(input.parts, ctx);
    ownProfiles.push(own);
    for (let c = 0; c < own.ordered.length; c++) pooledOrdered[c] = pooledOrdered[c]! + own.ordered[c]!;
    pooledIntakeDemand += own.demand;
  }
  const pooledProfile: IntakeProfile = { ordered: pooledOrdered, demand: pooledIntakeDemand };
  const flat = flatProfile(ctx);
  const pooledDemand = normalise(demandSums, flat);
  const pooledIntake = normalise(intakeSums, flat);

  const plans: Plan[] = [];
  const monitoringInputs: MonitoringInput[] = [];
  inputs.forEach((input, i) => {
    const sig = live.series[i]!;
    const outcomes: LeadOutcome[] = [];
    for (let L = 0; L <= settings.maxLead; L++) outcomes.push(applyLead(input, sig, live.location, models[L]!, ctx, L, selfCheck.has(L)));
    const level = Number.isFinite(sig.level) ? sig.level : Number.isFinite(sig.window.runRate) ? sig.window.runRate : 0;
    const profiles = seriesProfiles(input.frame, ctx, pooledDemand, pooledIntake, level);
    const dists = outcomes.map((o) => ({ certain: o.certain, mean: o.uncertainMean, phi: o.phi }));
    const cumulative = cumulativeQuantiles(dists, settings.quantiles, settings.leadErrorCorrelation);
    const leads: PlanLead[] = outcomes.map((o, L) => ({
      lead: L,
      weekStart: formatDay(o.weekDay),
      baseline: o.baseline,
      adjusted: o.adjusted,
      quantiles: leadQuantiles(dists[L]!, settings.quantiles),
      cumulativeQuantiles: cumulative[L]!,
      actualToDate: o.actualToDate,
      ...(L <= 1 ? { daily: dailySplit(o.adjusted, o.weekDay, input.frame.dayDemand, profiles.demand, ctx) } : {}),
      explanation: o.explanation,
    }));
    const prev = previous.get(input.item);
    let largestMove = 0;
    let moved = prev === undefined;
    if (prev) {
      for (const l of leads) {
        const b = prev.leads.find((x) => x.weekStart === l.weekStart)?.adjusted;
        if (b === undefined) continue;
        const move = Math.abs(l.adjusted - b);
        largestMove = Math.max(largestMove, move);
        if (move > settings.materialityUnits && move > settings.materialityShare * Math.max(b, 1e-9)) moved = true;
      }
    }
    plans.push({
      schemaVersion: PLAN_SCHEMA_VERSION,
      location: state.location as Plan['location'],
      item: input.item as Plan['item'],
      planDate: asOf.planDate,
      revision: options.revision ?? 1,
      basis: settings.demandBasis,
      leads,
      moved,
      largestMove,
    });

    const intake = dayIntake(input.parts, ctx, state.customers);
    const planned = leads.map((l) => {
      const b = prev?.leads.find((x) => x.weekStart === l.weekStart);
      return b ? b.adjusted : l.adjusted;
    });
    const unitPrice = state.master.items?.[input.item]?.unitPrice;
    monitoringInputs.push({
      item: input.item,
      date: asOf.planDate,
      intake: intake.total,
      expectedIntakeFromPlan: expectedIntake(planned, ownProfiles[i]!, pooledProfile, ctx, level),
      expectedIntakeFromBaseline: expectedIntake(leads.map((l) => l.baseline), ownProfiles[i]!, pooledProfile, ctx, level),
      ...(unitPrice !== undefined ? { unitPrice } : {}),
      byCustomer: intake.byCustomer,
      meanPerDay: sig.perDay,
      volumeBand: sig.band,
    });
  });

  const model: ManifestModel[] = models.map((m) => ({
    lead: m.lead,
    rows: m.rows,
    series: m.series,
    fallback: selfCheck.has(m.lead) ? 'self-check' : m.fitted ? null : 'location-unfit',
    coefficients: FEATURE_NAMES.map((name, k) => ({ name, value: m.coefficients[k]! })),
    weightedR2: m.weightedR2,
    locationFactor: live.location.factor,
    survivalRate: m.survival,
    dispersion: VOLUME_BANDS.map((band) => ({ band, phi: m.dispersion[band] })),
  }));
  return { plans, model, monitoringInputs };
}
