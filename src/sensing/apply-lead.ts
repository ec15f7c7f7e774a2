import type { Explanation, Fallback, Guardrail } from '../contracts/plan.ts';
import type { LocationSignal, SeriesSignal } from './as-of-signals.ts';
import { coveringVersionKnownAt, levelRatio, weekValue } from './baseline-lookup.ts';
import { computeFeatures, FEATURE_NAMES, predictRatio, type Features } from './features.ts';
import { applyGuardrails, guardrailBounds, type Bounds } from './guardrails.ts';
import type { LeadModel } from './lead-model.ts';
import type { RecomputeContext } from './recompute-context.ts';
import { at } from './series-frame.ts';
import type { SeriesInput } from './series-input.ts';

/** One series at one lead after the apply step: the number, its predictive split and its explanation. */
export interface LeadOutcome {
  readonly lead: number;
  readonly weekDay: number;
  readonly baseline: number | null;
  readonly adjusted: number;
  readonly actualToDate: number;
  /** Certain part (actual to date + surviving book) and the mean of the uncertain rest. */
  readonly certain: number;
  readonly uncertainMean: number;
  readonly phi: number;
  readonly explanation: Explanation;
}

// The model's coefficients and fit summary are the same in every explanation of a lead: one shared copy per model
// (readonly, like the whole plan), not two objects and five more per series (a close at 10k series made 300k).
const partsOfModel = new WeakMap<LeadModel, { coefficients: Explanation['coefficients']; fit: Explanation['fit'] }>();

function modelParts(model: LeadModel, halfLifeWeeks: number): { coefficients: Explanation['coefficients']; fit: Explanation['fit'] } {
  let parts = partsOfModel.get(model);
  if (parts === undefined || parts.fit.halfLifeWeeks !== halfLifeWeeks) {
    parts = {
      coefficients: FEATURE_NAMES.map((name, i) => ({ name, value: model.coefficients[i]! })),
      fit: { rows: model.rows, series: model.series, weightedR2: model.weightedR2, halfLifeWeeks },
    };
    partsOfModel.set(model, parts);
  }
  return parts;
}

function fmt(x: number): string {
  return Number.isInteger(x) ? String(x) : x.toFixed(2);
}

export function applyLead(
  input: SeriesInput,
  sig: SeriesSignal,
  loc: LocationSignal,
  model: LeadModel,
  ctx: RecomputeContext,
  lead: number,
  selfCheck: boolean,
): LeadOutcome {
  const s = ctx.settings;
  const f = input.frame;
  const p = ctx.H + lead;
  const weekDay = ctx.week0 + 7 * lead;
  const notes: string[] = [];

  // What is already known: actual to date (lead 0) and the book, and how much of the book survives.
  let actualToDate = 0;
  if (lead === 0) for (let d = weekDay; d <= ctx.planDay; d++) actualToDate += f.dayDemand[d - ctx.firstDay]!;
  const jc = s.maxLead - lead;
  const bookedAll = lead === 0 ? f.known0[p]! + f.known0Large[p]! : at(f.book, ctx, p, jc) + at(f.bookLarge, ctx, p, jc);
  const bookedLarge = lead === 0 ? f.known0Large[p]! : at(f.bookLarge, ctx, p, jc);
  const survival = model.survival;
  const floor = lead === 0 ? actualToDate + Math.max(0, bookedAll - actualToDate) * survival : bookedAll * survival;
  if (bookedLarge > 0) notes.push(`${fmt(bookedLarge)} units on unusually large lines are kept in this week but out of the ratios`);
  if (ctx.holidayLoss[p]! > 0) notes.push(`holiday week: ${Math.round(ctx.holidayLoss[p]! * 100)}% of the open days lost`);
  if (f.censored[p]) notes.push('this week has censored shipment days (open orders, short shipments): never a reason to adjust down');

  // The baseline version being adjusted, or the fallback when it has no value for this week.
  const ref = sig.ref;
  let baseline: number | undefined = weekValue(ref, weekDay);
  let fallback: Fallback | null = null;
  let versionShown = ref?.version ?? null;
  if (baseline === undefined && ref) {
    const cover = coveringVersionKnownAt(input.series, weekDay, ctx.planDay, ctx.cutoffMs);
    if (cover) {
      const rho = levelRatio(cover, ref);
      baseline = weekValue(cover, weekDay)! * rho;
      fallback = 'missing-baseline-week';
      versionShown = cover.version;
      notes.push(`version ${ref.version} has no value for this week; version ${cover.version} used, rebased ×${rho.toFixed(3)} to the current level`);
    }
  }

  let method: Explanation['method'] = 'regression';
  let predicted = 1;
  let features: Features | undefined;
  let raw: number;
  let bounds: Bounds | null = null;
  if (baseline === undefined) {
    fallback = 'no-baseline';
    method = 'run-rate';
    const rate = sig.window.runRate;
    raw = Number.isFinite(rate) ? rate : 0;
    notes.push(
      Number.isFinite(rate)
        ? `no baseline: recent run-rate of ${fmt(raw)} per week over ${sig.window.runRateWeeks} weeks, first-fill orders left out`
        : 'no baseline and no complete week of history: only the order book counts',
    );
  } else {
    bounds = guardrailBounds(baseline, s);
    if (sig.window.historyWeeks < s.newSeriesWeeks) {
      fallback = 'new-series';
      method = 'gamma-poisson';
      const prior = s.gammaPriorWeeks * baseline;
      predicted = (sig.window.testDemand + prior) / (sig.window.testBaseline + prior);
      notes.push(
        `new series (${sig.window.historyWeeks} complete weeks): baseline as prior worth ${s.gammaPriorWeeks} weeks, updated by ${fmt(sig.window.testDemand)} ordered against ${fmt(sig.window.testBaseline)} expected`,
      );
    } else if (selfCheck) {
      fallback = 'self-check';
      method = 'baseline';
      notes.push('sensing lost to the baseline significantly at this location and lead: baseline used');
    } else if (!model.fitted) {
      fallback = 'location-unfit';
      method = 'baseline';
      notes.push(`the location had ${model.rows} training rows at this lead (needs ${s.minRows}): baseline unchanged`);
    } else if (sig.small) {
      const t = sig.smallTest;
      if (t && t.significant) {
        method = 'small-series-exact-test';
        predicted = t.ratio;
        notes.push(`small series: ${fmt(t.demand)} ordered against ${fmt(t.expected)} expected in ${s.smallSeriesWeeks} weeks (exact test p = ${t.pValue.toPrecision(2)})`);
      } else {
        fallback = fallback ?? 'small-series';
        method = 'baseline';
        notes.push(`small series: no strong exact-test evidence${t ? ` (p = ${t.pValue.toPrecision(2)})` : ''}, baseline passed through`);
      }
    } else {
      features = computeFeatures(input, sig, loc, ctx, p, lead, baseline);
      predicted = predictRatio(model.coefficients, features.x);
    }
    raw = baseline * Math.max(0, predicted) + (method === 'regression' ? bookedLarge * survival : 0);
  }

  const guarded = applyGuardrails(raw, bounds, floor);
  const adjusted = guarded.value;
  const guardrail: Guardrail | null = guarded.guardrail;
  if (guardrail === 'order-book-floor') notes.push(`raised to the order book expected to survive (${fmt(floor)})`);

  // The band's φ comes from the fit's own rows; out of sample the error is a little larger (the coefficients and
  // φ are themselves estimates), so the uncertain part's variance is scaled by predictiveVarianceFactor:
  // κ(m + φm²) = m + φ'm²  ⇒  φ' = κφ + (κ − 1)/m.
  const uncertain = Math.max(0, adjusted - floor);
  const kappa = s.predictiveVarianceFactor;
  const phi = uncertain > 0 ? kappa * model.dispersion[sig.band] + (kappa - 1) / uncertain : model.dispersion[sig.band];
  const { coefficients, fit } = modelParts(model, s.halfLifeWeeks);
  const explanation: Explanation = {
    method,
    baselineVersion: versionShown,
    orderBook: bookedAll,
    largeLines: bookedLarge,
    survivalRate: survival,
    survivingOrderBook: floor,
    typicalBookShare: features ? features.bookShare : baseline === undefined ? null : sig.bookShare[lead]!,
    coverage: features ? features.coverage : null,
    recentRatio: features ? features.recentRatio : Number.isFinite(sig.recentRatio) ? sig.recentRatio : null,
    locationFactor: loc.factor,
    seriesFactor: sig.seriesFactor,
    seriesEvidenceWeight: sig.evidence,
    predictedRatio: predicted,
    appliedRatio: baseline !== undefined && baseline > 0 ? adjusted / baseline : null,
    bounds: bounds ? { lower: bounds.lower, upper: bounds.upper } : null,
    terms: features ? FEATURE_NAMES.map((name, i) => ({ name, value: features!.x[i]!, contribution: model.coefficients[i]! * features!.x[i]! })) : [],
    coefficients,
    fit,
    volumeBand: sig.band,
    dispersion: phi,
    guardrail,
    fallback,
    notes,
  };
  return {
    lead,
    weekDay,
    baseline: baseline ?? null,
    adjusted,
    actualToDate,
    certain: Math.min(floor, adjusted),
    uncertainMean: uncertain,
    phi,
    explanation,
  };
}
