// Weighted least squares that stays accurate on ill-conditioned designs, with an optional ridge prior.
//
// Method: drop zero-weight rows; centre every column and y at their weighted means (two-pass, so large
// offsets such as calendar years cancel exactly) and scale each column to unit weighted standard deviation;
// multiply rows by √w; solve the resulting least-squares problem by Householder QR, never forming X'WX (the
// normal equations square the condition number — NIST's Longley data loses half its digits that way).
// A ridge prior enters as extra rows of the same QR, so it is exact rather than a perturbed inverse.
//
// Objective minimised over intercept a and slopes β:
//   Σᵢ wᵢ (yᵢ − a − Σⱼ xᵢⱼβⱼ)²  +  Σⱼ λⱼ·sⱼ²·(βⱼ − tⱼ)²  +  μ·(a − t₀)²
// with sⱼ the weighted standard deviation of column j. λⱼ is measured in units of row weight: on an orthogonal
// design the slope is pulled toward its target by the factor Σw / (Σw + λ), i.e. the prior is worth λ
// weight-units of evidence (pseudo-rows when weights average 1), and more data overrides it. μ likewise.

import { NearcastError } from '../errors.ts';
import { householderLeastSquares, invertUpperTriangular } from './householder-qr.ts';

export interface RidgePrior {
  /** λ per slope (one number for all, or one per column), ≥ 0, in units of row weight. */
  readonly strength: number | ArrayLike<number>;
  /** Target slopes t (one per column); default all 0. */
  readonly target?: ArrayLike<number>;
  /** Optional prior on the intercept: μ in units of row weight, toward t₀. Needs `intercept: true`. */
  readonly intercept?: { readonly strength: number; readonly target: number };
}

export interface WlsInput {
  /** The design by columns (column j has one value per row); typed arrays welcome. No intercept column. */
  readonly columns: readonly ArrayLike<number>[];
  readonly y: ArrayLike<number>;
  /** Row weights ≥ 0 (default 1). Zero-weight rows are left out of the fit but still get fitted values. */
  readonly weights?: ArrayLike<number>;
  /** Fit an intercept (default true). */
  readonly intercept?: boolean;
  readonly ridge?: RidgePrior;
  /** Column names for error messages. */
  readonly names?: readonly string[];
}

export interface WlsFit {
  /** Slope per column, in the columns' own units. */
  readonly coefficients: number[];
  /** 0 when fitted without intercept. */
  readonly intercept: number;
  /**
   * Standard errors s·√diag((R'R)⁻¹) on the original scale (for unweighted OLS this is NIST's
   * s·√diag((X'X)⁻¹)); with a ridge prior they are the prior-regularised ones. Null when rows ≤ parameters.
   */
  readonly standardErrors: number[] | null;
  readonly interceptStandardError: number | null;
  /** a + Σ xⱼβⱼ for every input row (zero-weight rows included). */
  readonly fitted: Float64Array;
  /** y − fitted for every input row. */
  readonly residuals: Float64Array;
  /** 1 − Σw·e² / Σw·(y − ȳ_w)² (uncentred Σw·y² without intercept); null when y has no weighted spread. */
  readonly weightedR2: number | null;
  /** Σw·e² / (rows − parameters); null when rows ≤ parameters. */
  readonly residualVariance: number | null;
  /** Σw·e² over the rows used. */
  readonly weightedSse: number;
  /** Rows with positive weight. */
  readonly rows: number;
  /** Kish effective sample size (Σw)² / Σw². */
  readonly effectiveRows: number;
  /** Parameters estimated (slopes + intercept). */
  readonly parameters: number;
  readonly sumWeights: number;
}

function argError(detail: string): never {
  throw new NearcastError('NEARCAST_STATS_ARGUMENT_INVALID', [detail]);
}

function perColumn(value: number | ArrayLike<number> | undefined, p: number, fallback: number, field: string): Float64Array {
  const out = new Float64Array(p);
  if (value === undefined) return out.fill(fallback);
  if (typeof value === 'number') return out.fill(value);
  if (value.length !== p) argError(`${field} must have one entry per column (${p}), got ${value.length}`);
  for (let j = 0; j < p; j++) out[j] = value[j]!;
  return out;
}

/** Weighted least squares with optional ridge prior; see the file header for the objective. */
export function solveWls(input: WlsInput): WlsFit {
  const { columns, y } = input;
  const withIntercept = input.intercept ?? true;
  const p = columns.length;
  const n = y.length;
  const name = (j: number): string => input.names?.[j] ?? `column ${j}`;

  for (let j = 0; j < p; j++) {
    if (columns[j]!.length !== n) argError(`${name(j)} has ${columns[j]!.length} values for ${n} rows`);
  }
  if (input.weights !== undefined && input.weights.length !== n) {
    argError(`weights has ${input.weights.length} values for ${n} rows`);
  }
  const lambda = perColumn(input.ridge?.strength, p, 0, 'ridge.strength');
  const target = perColumn(input.ridge?.target, p, 0, 'ridge.target');
  for (let j = 0; j < p; j++) {
    if (!(lambda[j]! >= 0) || !Number.isFinite(lambda[j]!)) argError(`ridge.strength for ${name(j)} must be finite and ≥ 0`);
    if (!Number.isFinite(target[j]!)) argError(`ridge.target for ${name(j)} must be finite`);
  }
  const interceptPrior = input.ridge?.intercept;
  if (interceptPrior !== undefined) {
    if (!withIntercept) argError('ridge.intercept needs intercept: true');
    if (!(interceptPrior.strength >= 0) || !Number.isFinite(interceptPrior.strength)) {
      argError('ridge.intercept.strength must be finite and ≥ 0');
    }
    if (!Number.isFinite(interceptPrior.target)) argError('ridge.intercept.target must be finite');
  }

  // Rows in use, copied once into contiguous arrays so the passes below run on monomorphic Float64Arrays.
  const weights = input.weights;
  let m = 0;
  for (let i = 0; i < n; i++) {
    const w = weights === undefined ? 1 : weights[i]!;
    if (!(w >= 0) || !Number.isFinite(w)) argError(`weight of row ${i} must be finite and ≥ 0 (got ${String(w)})`);
    if (!Number.isFinite(y[i]!)) argError(`y of row ${i} must be finite (got ${String(y[i])})`);
    if (w > 0) m++;
  }
  for (let j = 0; j < p; j++) {
    const col = columns[j]!;
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(col[i]!)) argError(`${name(j)} of row ${i} must be finite (got ${String(col[i])})`);
    }
  }
  const q = p + (withIntercept ? 1 : 0);
  const hasRidge = interceptPrior !== undefined || lambda.some((l) => l > 0);
  if (m === 0) throw new NearcastError('NEARCAST_SOLVER_SINGULAR', ['no row has a positive weight']);
  if (!hasRidge && m < q) {
    throw new NearcastError('NEARCAST_SOLVER_SINGULAR', [`${m} rows cannot determine ${q} parameters`]);
  }
  const used = new Int32Array(m);
  const wu = new Float64Array(m);
  let sumW = 0;
  let sumW2 = 0;
  for (let i = 0, r = 0; i < n; i++) {
    const w = weights === undefined ? 1 : weights[i]!;
    if (w > 0) {
      used[r] = i;
      wu[r] = w;
      sumW += w;
      sumW2 += w * w;
      r++;
    }
  }
  const sw = new Float64Array(m);
  for (let r = 0; r < m; r++) sw[r] = Math.sqrt(wu[r]!);

  // Augmented system, column-major: unknowns [c (centred intercept)?, β̃₀ … β̃ₚ₋₁] with β̃ⱼ = sⱼβⱼ. The used
  // rows are copied raw into A and b first, then centred, scaled and multiplied by √w in place.
  const ridgeRows: number[] = [];
  for (let j = 0; j < p; j++) if (lambda[j]! > 0) ridgeRows.push(j);
  const withInterceptPrior = interceptPrior !== undefined && interceptPrior.strength > 0;
  const rowsTotal = m + ridgeRows.length + (withInterceptPrior ? 1 : 0);
  const off = withIntercept ? 1 : 0;
  const A: Float64Array[] = [];
  for (let k = 0; k < q; k++) A.push(new Float64Array(rowsTotal));
  const b = new Float64Array(rowsTotal);
  for (let r = 0; r < m; r++) b[r] = y[used[r]!]!;
  for (let j = 0; j < p; j++) {
    const col = columns[j]!;
    const a = A[j + off]!;
    for (let r = 0; r < m; r++) a[r] = col[used[r]!]!;
  }

  const xbar = new Float64Array(p);
  const scale = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    const a = A[j + off]!;
    const mean = withIntercept ? weightedMean(a, wu, m, sumW) : 0;
    xbar[j] = mean;
    let ss = 0;
    for (let r = 0; r < m; r++) {
      const d = a[r]! - mean;
      ss += wu[r]! * d * d;
    }
    const sd = Math.sqrt(ss / sumW);
    if (!(sd > 0)) {
      if (lambda[j]! > 0) scale[j] = 1;
      else {
        throw new NearcastError('NEARCAST_SOLVER_SINGULAR', [
          `${name(j)} does not vary over the weighted rows${withIntercept ? ' (it duplicates the intercept)' : ''}`,
        ]);
      }
    } else scale[j] = sd;
    const inv = 1 / scale[j]!;
    for (let r = 0; r < m; r++) a[r] = sw[r]! * (a[r]! - mean) * inv;
  }
  const ybar = withIntercept ? weightedMean(b, wu, m, sumW) : 0;
  let sst = 0;
  for (let r = 0; r < m; r++) {
    const d = b[r]! - ybar;
    sst += wu[r]! * d * d;
    b[r] = sw[r]! * d;
  }
  if (withIntercept) A[0]!.set(sw);

  let row = m;
  for (const j of ridgeRows) {
    const sl = Math.sqrt(lambda[j]!);
    A[j + off]![row] = sl;
    b[row] = sl * scale[j]! * target[j]!;
    row++;
  }
  if (withInterceptPrior) {
    // a = ȳ + c − Σ x̄ⱼ β̃ⱼ / sⱼ  ⇒  √μ·(c − Σ x̄ⱼ/sⱼ·β̃ⱼ) = √μ·(t₀ − ȳ)
    const sm = Math.sqrt(interceptPrior.strength);
    A[0]![row] = sm;
    for (let j = 0; j < p; j++) A[j + off]![row] = (-sm * xbar[j]!) / scale[j]!;
    b[row] = sm * (interceptPrior.target - ybar);
    row++;
  }

  const { R, solution } = householderLeastSquares(A, b, q, (k) => (withIntercept && k === 0 ? 'intercept' : name(k - off)));

  const coefficients = new Array<number>(p);
  for (let j = 0; j < p; j++) coefficients[j] = solution[j + off]! / scale[j]!;
  let intercept = 0;
  if (withIntercept) {
    intercept = ybar + solution[0]!;
    for (let j = 0; j < p; j++) intercept -= xbar[j]! * coefficients[j]!;
  }

  // Evaluate around the centre for the same cancellation reasons as the fit.
  const fitted = new Float64Array(n).fill(withIntercept ? ybar + solution[0]! : 0);
  for (let j = 0; j < p; j++) {
    const col = columns[j]!;
    const beta = coefficients[j]!;
    const mean = xbar[j]!;
    for (let i = 0; i < n; i++) fitted[i] = fitted[i]! + beta * (col[i]! - mean);
  }
  const residuals = new Float64Array(n);
  for (let i = 0; i < n; i++) residuals[i] = y[i]! - fitted[i]!;
  let sse = 0;
  for (let r = 0; r < m; r++) {
    const e = residuals[used[r]!]!;
    sse += wu[r]! * e * e;
  }
  const weightedR2 = sst > 0 ? 1 - sse / sst : null;
  const dof = m - q;
  const residualVariance = dof > 0 ? sse / dof : null;

  let standardErrors: number[] | null = null;
  let interceptStandardError: number | null = null;
  if (residualVariance !== null) {
    const Rinv = invertUpperTriangular(R, q);
    // Cov(θ) = s²·R⁻¹R⁻ᵀ; row k of R⁻¹ dotted with itself gives diag.
    const covRow = (a: Float64Array, c: Float64Array): number => {
      let s = 0;
      for (let k = 0; k < q; k++) s += a[k]! * c[k]!;
      return s;
    };
    const rowsOfRinv: Float64Array[] = [];
    for (let k = 0; k < q; k++) {
      const rk = new Float64Array(q);
      for (let l = 0; l < q; l++) rk[l] = Rinv[k * q + l]!;
      rowsOfRinv.push(rk);
    }
    standardErrors = [];
    for (let j = 0; j < p; j++) {
      const rk = rowsOfRinv[j + off]!;
      standardErrors.push(Math.sqrt(residualVariance * covRow(rk, rk)) / scale[j]!);
    }
    if (withIntercept) {
      // a = ȳ + c − Σ (x̄ⱼ/sⱼ) β̃ⱼ: gradient g = [1, −x̄/s]; Var(a) = s²·|R⁻ᵀg|²... computed as gᵀR⁻¹R⁻ᵀg.
      const g = new Float64Array(q);
      g[0] = 1;
      for (let j = 0; j < p; j++) g[j + 1] = -xbar[j]! / scale[j]!;
      // v = R⁻ᵀ g  ⇔  vₗ = Σₖ R⁻¹[k][l]·gₖ
      let s = 0;
      for (let l = 0; l < q; l++) {
        let v = 0;
        for (let k = 0; k <= l; k++) v += Rinv[k * q + l]! * g[k]!;
        s += v * v;
      }
      interceptStandardError = Math.sqrt(residualVariance * s);
    }
  }

  return {
    coefficients,
    intercept,
    standardErrors,
    interceptStandardError,
    fitted,
    residuals,
    weightedR2,
    residualVariance,
    weightedSse: sse,
    rows: m,
    effectiveRows: (sumW * sumW) / sumW2,
    parameters: q,
    sumWeights: sumW,
  };
}

function weightedMean(col: Float64Array, w: Float64Array, m: number, sumW: number): number {
  let s = 0;
  for (let r = 0; r < m; r++) s += w[r]! * col[r]!;
  let mean = s / sumW;
  // Second pass removes the rounding of the first (matters when |mean| ≫ spread, e.g. years).
  let c = 0;
  for (let r = 0; r < m; r++) c += w[r]! * (col[r]! - mean);
  mean += c / sumW;
  return mean;
}

/** a + Σ xⱼβⱼ for one new row (values in column order). */
export function wlsPredict(fit: Pick<WlsFit, 'coefficients' | 'intercept'>, row: ArrayLike<number>): number {
  if (row.length !== fit.coefficients.length) {
    argError(`row has ${row.length} values for ${fit.coefficients.length} coefficients`);
  }
  let f = fit.intercept;
  for (let j = 0; j < row.length; j++) f += fit.coefficients[j]! * row[j]!;
  return f;
}
