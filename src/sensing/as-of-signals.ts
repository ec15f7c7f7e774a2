import { negBinomialCdf, negBinomialSf } from '../stats/count-distributions.ts';
import { volumeBandOf, VOLUME_BANDS, type VolumeBand } from '../stats/volume-band.ts';
import { weekValue } from './baseline-lookup.ts';
import type { RecomputeContext } from './recompute-context.ts';
import { recentWindow, type RecentWindow } from './recent-window.ts';
import type { SeriesInput } from './series-input.ts';
import type { BaselineVersionEntry } from './series-state.ts';
import { evidenceWeight, fitSlabPrior, type SlabPrior } from './spike-and-slab.ts';
import { median } from '../stats/robust.ts';
import { successiveDifferenceVariance } from './successive-differences.ts';
import { capFactors } from './weights.ts';
import { adaptiveLevel } from './adaptive-window.ts';

// Everything the model uses about the location at one as-of day j (plan date − 7j), computed only from what was
// known by the end of that day: per series the recent ratio, its noise, the evidence-gated series factor, the
// typical order-book build-up; for the location the location-wide factor. Training rows and the live plan read
// the same signals, so a feature recomputed later equals the one computed live.

export interface SmallSeriesTest {
  readonly demand: number;
  readonly expected: number;
  readonly pValue: number;
  readonly significant: boolean;
  /** Gamma–Poisson posterior ratio with the baseline as prior (used only when significant). */
  readonly ratio: number;
}

/** What training rows and feature audits read of a series' signal at an as-of day (kept between closes as columns). */
export interface TrainingSeriesSignal {
  readonly ref: BaselineVersionEntry | undefined;
  /** Complete weeks since the series' first activity, as of that day. */
  readonly historyWeeks: number;
  /** Units per business day behind the volume band. */
  readonly perDay: number;
  readonly small: boolean;
  /** Typical share of the week booked by the as-of weekday, per lead (shrunk toward the location's). */
  readonly bookShare: readonly number[];
  /** Typical share of the week's demand dated up to the as-of weekday (lead 0). */
  readonly toDateShare: number;
  /** Week-to-week variance of the series' ratio (relative, per week). */
  readonly noiseVar: number;
  readonly seriesFactor: number;
}

export interface SeriesSignal extends TrainingSeriesSignal {
  readonly window: RecentWindow;
  /** Mean weekly baseline over the leads as of that day (units per week); NaN without baseline. */
  readonly level: number;
  readonly band: VolumeBand;
  readonly bookShare: number[];
  /** Recent ratio over the adaptive window (NaN for small series or without usable weeks). */
  readonly recentRatio: number;
  /** Series deviation from the location factor and its sampling variance. */
  readonly delta: number;
  readonly deltaVar: number;
  /** Weight given to the series' own deviation (0 … 1); it sets the series factor. */
  readonly evidence: number;
  readonly smallTest: SmallSeriesTest | undefined;
}

export interface LocationSignal {
  /** Weekly location factor by age (weighted median of series ratios). */
  readonly weekly: Float64Array;
  readonly factorHat: number;
  readonly factorVar: number;
  readonly evidence: number;
  /** Evidence-gated location factor (1 = no location-wide change). */
  readonly factor: number;
  readonly seriesPrior: SlabPrior;
  readonly seriesCount: number;
  readonly bookShare: Float64Array;
  readonly toDateShare: number;
}

/** What the order-book and level terms read of a series' signal (see features.ts). */
export interface SeriesTerms {
  readonly bookShare: ArrayLike<number>;
  readonly toDateShare: number;
  readonly seriesFactor: number;
}

/**
 * The signals of every input series at one as-of day as training rows and feature audits read them, one column per
 * field (entry i is input series i; bookShare holds `width` leads per series). Past days' signals are kept between
 * closes for every business day of the training window: as objects they were tens of objects per series and day
 * for the garbage collector to walk on every major collection.
 */
export interface TrainingSignals {
  readonly location: LocationSignal;
  readonly width: number;
  /** 1 where the series has a signal that day. */
  readonly present: Uint8Array;
  readonly ref: ReadonlyArray<BaselineVersionEntry | undefined>;
  readonly historyWeeks: Float64Array;
  readonly perDay: Float64Array;
  readonly small: Uint8Array;
  readonly bookShare: Float64Array;
  readonly toDateShare: Float64Array;
  readonly noiseVar: Float64Array;
  readonly seriesFactor: Float64Array;
}

export interface AsOfSignals {
  readonly j: number;
  readonly series: ReadonlyArray<SeriesSignal | undefined>;
  readonly location: LocationSignal;
}

/** The columns training rows need, without the per-week windows (what is kept between closes). */
export function trainingPart(signals: AsOfSignals, width: number): TrainingSignals {
  const n = signals.series.length;
  const present = new Uint8Array(n);
  const ref: Array<BaselineVersionEntry | undefined> = new Array(n).fill(undefined);
  const historyWeeks = new Float64Array(n);
  const perDay = new Float64Array(n);
  const small = new Uint8Array(n);
  const bookShare = new Float64Array(n * width);
  const toDateShare = new Float64Array(n);
  const noiseVar = new Float64Array(n);
  const seriesFactor = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = signals.series[i];
    if (x === undefined) continue;
    present[i] = 1;
    ref[i] = x.ref;
    historyWeeks[i] = x.historyWeeks;
    perDay[i] = x.perDay;
    small[i] = x.small ? 1 : 0;
    for (let L = 0; L < width; L++) bookShare[i * width + L] = x.bookShare[L]!;
    toDateShare[i] = x.toDateShare;
    noiseVar[i] = x.noiseVar;
    seriesFactor[i] = x.seriesFactor;
  }
  return { location: signals.location, width, present, ref, historyWeeks, perDay, small, bookShare, toDateShare, noiseVar, seriesFactor };
}

/** Series i's terms from the columns (undefined where it has no signal that day). */
export function seriesTermsAt(signals: TrainingSignals, i: number): SeriesTerms | undefined {
  if (!signals.present[i]) return undefined;
  const w = signals.width;
  return { bookShare: signals.bookShare.subarray(i * w, i * w + w), toDateShare: signals.toDateShare[i]!, seriesFactor: signals.seriesFactor[i]! };
}

function levelOf(ref: BaselineVersionEntry | undefined, ctx: RecomputeContext, j: number): number {
  let sum = 0;
  let n = 0;
  for (let L = 0; L <= ctx.settings.maxLead; L++) {
    const v = weekValue(ref, ctx.week0 - 7 * j + 7 * L);
    if (v !== undefined) {
      sum += v;
      n++;
    }
  }
  return n > 0 ? sum / n : NaN;
}

function smallTest(w: RecentWindow, level: number, ctx: RecomputeContext): SmallSeriesTest | undefined {
  const s = ctx.settings;
  if (!(w.testBaseline > 0)) return undefined;
  const n = Math.round(w.testDemand);
  const mu = w.testBaseline;
  const phi = s.dispersionDefault;
  const p = Math.min(1, 2 * Math.min(negBinomialSf(n, mu, phi), negBinomialCdf(n, mu, phi)));
  const prior = s.gammaPriorWeeks * (Number.isFinite(level) ? level : mu / s.smallSeriesWeeks);
  return { demand: w.testDemand, expected: mu, pValue: p, significant: p < s.smallSeriesAlpha, ratio: (w.testDemand + prior) / (mu + prior) };
}

function mean(values: number[]): number {
  return values.length === 0 ? NaN : values.reduce((a, b) => a + b, 0) / values.length;
}

/** Pseudo-differences with which the band's pooled noise weighs against a series' own. */
const POOLED_DIFFS = 8;

export function asOfSignals(inputs: readonly SeriesInput[], ctx: RecomputeContext, j: number): AsOfSignals {
  const s = ctx.settings;
  const maxLead = s.maxLead;
  const n = inputs.length;
  const windows: RecentWindow[] = [];
  const levels = new Float64Array(n);
  const small = new Uint8Array(n);
  const bands: VolumeBand[] = [];
  for (let i = 0; i < n; i++) {
    const w = recentWindow(inputs[i]!, ctx, j);
    windows.push(w);
    const ref = inputs[i]!.ref[j];
    const level = levelOf(ref, ctx, j);
    levels[i] = level;
    const perDay = (Number.isFinite(level) ? level : w.runRate) / ctx.openWeekdays;
    const band = volumeBandOf(perDay);
    bands.push(band);
    small[i] = perDay < s.smallSeriesPerDay || !Number.isFinite(perDay) ? 1 : 0;
  }

  // Location-wide build-up, pooled over every series.
  const pooledBooked = new Float64Array(maxLead + 1);
  let pooledDemand = 0;
  let pooledToDate = 0;
  for (const w of windows) {
    for (let L = 0; L <= maxLead; L++) pooledBooked[L] = pooledBooked[L]! + w.bookedSum[L]!;
    pooledDemand += w.demandSum;
    pooledToDate += w.toDateSum;
  }
  const locBookShare = new Float64Array(maxLead + 1);
  for (let L = 0; L <= maxLead; L++) locBookShare[L] = pooledDemand > 0 ? Math.min(1, pooledBooked[L]! / pooledDemand) : 0;
  const locToDate = pooledDemand > 0 ? Math.min(1, pooledToDate / pooledDemand) : 0;

  // Weekly location factor: weighted median of the sensed series' weekly ratios (volume weights, capped), robust
  // to one wild series or one wild week.
  const R = s.recentWeeks;
  const weekly = new Float64Array(R).fill(NaN);
  const vals: number[] = [];
  const wts: number[] = [];
  for (let age = 0; age < R; age++) {
    vals.length = 0;
    wts.length = 0;
    for (let i = 0; i < n; i++) {
      const r = windows[i]!.ratios[age]!;
      if (small[i] || !Number.isFinite(r)) continue;
      vals.push(r);
      wts.push(windows[i]!.baselines[age]!);
    }
    if (vals.length === 0) continue;
    const caps = capFactors(wts, s.maxSeriesWeightShare);
    for (let k = 0; k < wts.length; k++) wts[k] = wts[k]! * caps[k]!;
    weekly[age] = median(vals, wts);
  }
  // Series noise: week-to-week spread of each series' ratio relative to the location's weekly factor, pooled by
  // volume band (every series gets a stable estimate), floored.
  const ownVar = new Float64Array(n).fill(NaN);
  const ownDiffs = new Int32Array(n);
  const perBand = new Map<VolumeBand, number[]>();
  const e = new Float64Array(R);
  for (let i = 0; i < n; i++) {
    if (small[i]) continue;
    let cnt = 0;
    for (let age = R - 1; age >= 0; age--) {
      const r = windows[i]!.ratios[age]!;
      const f = weekly[age]!;
      e[age] = Number.isFinite(r) && f > 0 ? r / f : NaN;
      if (Number.isFinite(e[age]!)) cnt++;
    }
    const v = successiveDifferenceVariance(e);
    if (Number.isFinite(v)) {
      ownVar[i] = v;
      ownDiffs[i] = cnt - 1;
      const list = perBand.get(bands[i]!) ?? [];
      list.push(v);
      perBand.set(bands[i]!, list);
    }
  }
  const bandVar = new Map<VolumeBand, number>();
  for (const [band, list] of perBand) bandVar.set(band, mean(list));
  const floor = s.minRatioNoise ** 2;
  const noiseOf = (i: number): number => {
    let pooled = bandVar.get(bands[i]!);
    if (pooled === undefined) {
      // Nearest band with an estimate, else the count noise a Poisson week of this level would have.
      const b = VOLUME_BANDS.indexOf(bands[i]!);
      for (let d = 1; pooled === undefined && d < VOLUME_BANDS.length; d++) pooled = bandVar.get(VOLUME_BANDS[b - d]!) ?? bandVar.get(VOLUME_BANDS[b + d]!);
      if (pooled === undefined) pooled = 1 / Math.max(1, levels[i]!) + s.dispersionDefault;
    }
    const own = ownVar[i]!;
    const k = Number.isFinite(own) ? ownDiffs[i]! : 0;
    const v = k > 0 ? (k * own + POOLED_DIFFS * pooled) / (k + POOLED_DIFFS) : pooled;
    return Math.max(floor, v);
  };

  // Location factor, evidence-gated with a fixed prior (one location cannot estimate its own spread). Its weekly
  // noise is the larger of its own week-to-week spread (few weeks: noisy) and the sampling noise of a median of
  // the series' ratios, (π/2)·mean variance / series (for roughly normal noise).
  // Each sensed series' noise, once (it feeds both the location's cross-section and the series' own deviation).
  const noise = new Float64Array(n);
  let acc = 0;
  let cnt = 0;
  for (let i = 0; i < n; i++) {
    if (small[i]) {
      noise[i] = NaN;
      continue;
    }
    noise[i] = noiseOf(i);
    acc += noise[i]!;
    cnt++;
  }
  const crossSection = cnt > 0 ? ((Math.PI / 2) * acc) / cnt / cnt : 1;
  const ownSpread = successiveDifferenceVariance(weekly);
  const locNoise = Math.max(floor, crossSection, Number.isFinite(ownSpread) ? ownSpread : 0);
  const locLevel = adaptiveLevel(weekly, locNoise, s.recentHalfLifeWeeks, s.halfLifeWeeks, s.levelSwitchFrom, s.levelSwitchTo);
  let factorHat = NaN;
  if (locLevel.sumSquares > 0) {
    factorHat = 0;
    for (let age = 0; age < R; age++) if (locLevel.weights[age]! > 0) factorHat += locLevel.weights[age]! * weekly[age]!;
  }
  const factorVar = locLevel.sumSquares > 0 ? locNoise * locLevel.sumSquares : Infinity;
  const locEvidence = Number.isFinite(factorHat)
    ? evidenceWeight(factorHat - 1, factorVar, { noChange: s.locationNoChangePrior, spread2: s.locationShiftSd ** 2 })
    : 0;
  const factor = Number.isFinite(factorHat) ? 1 + locEvidence * (factorHat - 1) : 1;

  // Series deviations from the location factor, then the spike-and-slab prior across series.
  const deltas: number[] = [];
  const dvars: number[] = [];
  const deltaOf = new Float64Array(n).fill(NaN);
  const dvarOf = new Float64Array(n).fill(NaN);
  const recentRatio = new Float64Array(n).fill(NaN);
  for (let i = 0; i < n; i++) {
    const w = windows[i]!;
    if (small[i] || !(factorHat > 0)) continue;
    // The series' ratio over its adaptive window, as a ratio of sums; its deviation from the location factor.
    const lvl = adaptiveLevel(w.ratios, noise[i]!, s.recentHalfLifeWeeks, s.halfLifeWeeks, s.levelSwitchFrom, s.levelSwitchTo);
    let num = 0;
    let den = 0;
    for (let age = 0; age < R; age++) {
      const wt = lvl.weights[age]!;
      if (!(wt > 0)) continue;
      num += wt * w.ratios[age]! * w.baselines[age]!;
      den += wt * w.baselines[age]!;
    }
    if (!(den > 0)) continue;
    recentRatio[i] = num / den;
    // Against the gated factor the series is planned on, so that with full evidence R·q is the series' own ratio.
    deltaOf[i] = recentRatio[i]! / factor - 1;
    dvarOf[i] = noise[i]! * lvl.sumSquares;
    deltas.push(deltaOf[i]!);
    dvars.push(dvarOf[i]!);
  }
  const defaults: SlabPrior = { noChange: s.seriesNoChangePrior, spread2: s.seriesShiftSd ** 2 };
  const seriesPrior =
    deltas.length >= s.minSeriesForSpread
      ? fitSlabPrior(deltas, dvars, defaults, {
          noChangeMin: s.seriesNoChangePriorMin,
          noChangeMax: 0.999,
          spreadMin: s.seriesShiftSdMin,
          spreadMax: s.seriesShiftSdMax,
        })
      : defaults;

  const out: Array<SeriesSignal | undefined> = [];
  for (let i = 0; i < n; i++) {
    const w = windows[i]!;
    const level = levels[i]!;
    const prior = s.bookProfilePriorWeeks * (Number.isFinite(level) ? level : Number.isFinite(w.runRate) ? w.runRate : 0);
    const bookShare: number[] = new Array(maxLead + 1).fill(0);
    for (let L = 0; L <= maxLead; L++) {
      bookShare[L] = w.demandSum + prior > 0 ? Math.min(1, (w.bookedSum[L]! + prior * locBookShare[L]!) / (w.demandSum + prior)) : locBookShare[L]!;
    }
    const toDateShare = w.demandSum + prior > 0 ? Math.min(1, (w.toDateSum + prior * locToDate) / (w.demandSum + prior)) : locToDate;
    const delta = deltaOf[i]!;
    const evidence = Number.isFinite(delta) ? evidenceWeight(delta, dvarOf[i]!, seriesPrior) : 0;
    out.push({
      window: w,
      historyWeeks: w.historyWeeks,
      recentRatio: recentRatio[i]!,
      ref: inputs[i]!.ref[j],
      level,
      perDay: (Number.isFinite(level) ? level : w.runRate) / ctx.openWeekdays,
      band: bands[i]!,
      small: small[i] === 1,
      bookShare,
      toDateShare,
      noiseVar: noise[i]!,
      delta,
      deltaVar: dvarOf[i]!,
      evidence,
      seriesFactor: Number.isFinite(delta) ? 1 + evidence * delta : 1,
      smallTest: small[i] ? smallTest(w, level, ctx) : undefined,
    });
  }
  return {
    j,
    series: out,
    location: {
      weekly,
      factorHat,
      factorVar,
      evidence: locEvidence,
      factor,
      seriesPrior,
      seriesCount: deltas.length,
      bookShare: locBookShare,
      toDateShare: locToDate,
    },
  };
}
