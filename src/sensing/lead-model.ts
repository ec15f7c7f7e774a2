import { addToDispersionPool, dispersionByBand, emptyDispersionPool } from '../stats/dispersion.ts';
import type { VolumeBand } from '../stats/volume-band.ts';
import { solveWls } from '../stats/wls.ts';
import { FEATURE_COUNT, FEATURE_NAMES, FEATURE_PRIOR } from './features.ts';
import type { RecomputeContext } from './recompute-context.ts';
import type { TrainingRows } from './training-rows.ts';

/** Columns of the evidence-gated location and series level terms. */
const GATED_TERMS = new Set([1, 2]);
import { weightedQuantiles } from '../stats/robust.ts';

/** The fitted model of one location and lead, with what the apply step and the explanation need. */
export interface LeadModel {
  readonly lead: number;
  /** False when the location had too few training rows: the lead falls back to the baseline (location-unfit). */
  readonly fitted: boolean;
  readonly coefficients: Float64Array;
  readonly standardErrors: number[] | null;
  readonly rows: number;
  readonly series: number;
  readonly weightedR2: number | null;
  /** Bounds the target ratios were winsorised to. */
  readonly winsor: readonly [number, number];
  /** Share of booked quantity expected to survive at this lead. */
  readonly survival: number;
  /** Dispersion φ of the not-yet-certain part of a week, per volume band (Var = μ + φμ²). */
  readonly dispersion: Record<VolumeBand, number>;
}

/**
 * Fits y − 1 = Σ β·x by weighted least squares (QR on scaled columns, no intercept: with every term at 0 the plan
 * is the baseline), winsorised targets, and a ridge prior toward FEATURE_PRIOR worth `ridgeWeeks` weeks of the
 * location's training weight.
 */
export function fitLeadModel(rows: TrainingRows, survival: number, ctx: RecomputeContext): LeadModel {
  const s = ctx.settings;
  let fitRows = 0;
  for (let r = 0; r < rows.n; r++) if (rows.weight[r]! > 0) fitRows++;
  const fitted = fitRows >= s.minRows;
  // One sort for both winsorising bounds.
  const [lo, hi] = fitted ? (weightedQuantiles(rows.y, rows.weight, [s.winsorLower, s.winsorUpper]) as [number, number]) : [0, 0];
  const y = new Float64Array(rows.n);
  for (let r = 0; r < rows.n; r++) y[r] = Math.min(hi, Math.max(lo, rows.y[r]!)) - 1;

  let coefficients = new Float64Array(FEATURE_COUNT);
  let standardErrors: number[] | null = null;
  let weightedR2: number | null = null;
  let fittedRatio = new Float64Array(rows.n).fill(1);
  if (fitted) {
    let sumW = 0;
    for (let r = 0; r < rows.n; r++) sumW += rows.weight[r]!;
    // The prior is worth `ridgeWeeks` weeks of the location's rows. For the evidence-gated level terms each
    // pseudo-row carries a term of size ridgeReferenceTerm, not the column's own (small) spread: a gate that seldom
    // opened leaves a handful of noisy rows, which must not overturn the prior coefficient. The order-book,
    // week-to-date and holiday terms are measured against their own spread, so the data set them.
    const lambda = (s.ridgeWeeks * sumW) / s.lookbackWeeks;
    const strength = rows.columns.map((col, c) => {
      if (c === 0) return Math.max(1e-9, (s.bookRidgeWeeks * sumW) / s.lookbackWeeks);
      if (!GATED_TERMS.has(c)) return Math.max(1e-9, lambda);
      let ss = 0;
      for (let r = 0; r < rows.n; r++) ss += rows.weight[r]! * col[r]! * col[r]!;
      const rms2 = sumW > 0 ? ss / sumW : 0;
      return Math.max(1e-9, rms2 > 0 ? (lambda * s.ridgeReferenceTerm ** 2) / rms2 : lambda);
    });
    const fit = fitLevelsTogether(rows, y, strength);
    coefficients = Float64Array.from(fit.coefficients);
    // A booked excess carries through one for one, a little more where early bookings herald the rest of the week.
    // Rows from the weeks right after a level shift (book up, level terms not yet caught up) would teach a much
    // larger factor, which then multiplies booking noise once the level terms have caught up: bound it.
    coefficients[0] = Math.min(s.bookCoefficientMax, Math.max(0, coefficients[0]!));
    standardErrors = fit.standardErrors;
    weightedR2 = fit.weightedR2;
    // A plain loop: Float64Array.from over a typed array walks the iterator protocol, an object per row.
    fittedRatio = new Float64Array(rows.n);
    for (let r = 0; r < rows.n; r++) fittedRatio[r] = 1 + fit.fitted[r]!;
  }

  // Dispersion of what was not yet certain (actual to date and surviving book are certain), per volume band, from
  // the rows' own prediction errors: (d − μ̂)² − m has expectation φ·m² for the uncertain part m.
  const pool = emptyDispersionPool();
  for (let r = 0; r < rows.n; r++) {
    const b = rows.baseline[r]!;
    const mu = b * (rows.small[r] ? 1 : Math.max(0, fittedRatio[r]!));
    const booked = rows.booked[r]!;
    const certain = rows.lead === 0 ? rows.toDate[r]! + (booked - rows.toDate[r]!) * survival : booked * survival;
    const m = mu - certain;
    if (!(m > 0)) continue;
    addToDispersionPool(pool, rows.perDay[r]!, Math.max(0, rows.demand[r]! - certain), m, rows.recency[r]!);
  }
  const dispersion = dispersionByBand(pool, { minObservations: s.dispersionMinRows, fallback: s.dispersionDefault, maxPhi: 10 });
  return {
    lead: rows.lead,
    fitted,
    coefficients,
    standardErrors,
    rows: fitRows,
    series: rows.series,
    weightedR2,
    winsor: [lo, hi],
    survival,
    dispersion,
  };
}

/** Columns that share one coefficient (their sum is the design column); columns in no group get 0. */
type Groups = readonly (readonly number[])[];

const LOCATION = 1;
const SERIES = 2;

/**
 * The WLS fit with one coefficient for both evidence-gated level terms, kept non-negative. The location factor R and
 * the series factor q are estimated apart (their own evidence gates), but the plan carries their product through:
 * 1 + β·[(R − 1) + R·(q − 1)]·decay = 1 + β·(R·q − 1)·decay. Two free slopes broke that: a series that does not
 * share a location-wide rise has q ≈ 1/R, and with β_location ≠ β_series it was planned by (β_location − β_series)·
 * (R − 1) away from its own level, up or down. And at long leads the as-of level terms of the training rows vary by
 * a few per cent, so a change no as-of day could see (a heat wave's first weeks) taught a negative slope from that
 * sliver, which an open gate then extrapolated into plans below baseline in the middle of the rise. A negative
 * shared slope is taken out (0: the level is not carried at this lead) and the rest refitted, the active-set step
 * of non-negative least squares.
 */
function fitLevelsTogether(rows: TrainingRows, y: Float64Array, strength: number[]): { coefficients: number[]; standardErrors: number[] | null; weightedR2: number | null; fitted: Float64Array } {
  const fitGroups = (groups: Groups) => {
    const fit = solveWls({
      columns: groups.map((g) => (g.length === 1 ? rows.columns[g[0]!]! : sumColumns(g.map((c) => rows.columns[c]!)))),
      y,
      weights: rows.weight,
      intercept: false,
      ridge: { strength: groups.map((g) => strength[g[0]!]!), target: groups.map((g) => FEATURE_PRIOR[g[0]!]!) },
      names: groups.map((g) => g.map((c) => FEATURE_NAMES[c]!).join('+')),
    });
    const coefficients = new Array<number>(FEATURE_COUNT).fill(0);
    const standardErrors = fit.standardErrors ? new Array<number>(FEATURE_COUNT).fill(0) : null;
    groups.forEach((g, k) => {
      for (const c of g) {
        coefficients[c] = fit.coefficients[k]!;
        if (standardErrors) standardErrors[c] = fit.standardErrors![k]!;
      }
    });
    return { coefficients, standardErrors, weightedR2: fit.weightedR2, fitted: fit.fitted };
  };
  const others = rows.columns.map((_, c) => c).filter((c) => c !== LOCATION && c !== SERIES).map((c) => [c]);
  const shared = fitGroups([...others, [LOCATION, SERIES]]);
  if (shared.coefficients[LOCATION]! >= 0) return shared;
  return fitGroups(others);
}

function sumColumns(columns: readonly Float64Array[]): Float64Array {
  const out = new Float64Array(columns[0]!.length);
  for (const col of columns) for (let r = 0; r < out.length; r++) out[r] = out[r]! + col[r]!;
  return out;
}
