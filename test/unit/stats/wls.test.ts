import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { MultivariateLinearRegression } from 'ml-regression';
import { solveWls, wlsPredict } from '../../../src/stats/wls.ts';
import { createRng, sampleNormal } from '../../../src/stats/random.ts';
import { isNearcastError } from '../../../src/errors.ts';

interface Certified {
  estimate: number[];
  sd_estimate: number[];
  residual_sd: number;
  r_squared: number;
}

function reference(name: string): { data: Record<string, unknown>; certified: Record<string, unknown> } {
  return JSON.parse(readFileSync(new URL(`../../reference/strd-${name}.json`, import.meta.url), 'utf8')) as {
    data: Record<string, unknown>;
    certified: Record<string, unknown>;
  };
}

/** Log relative error (NIST's "LRE"): the number of correct significant digits. */
function digits(estimate: number, certified: number): number {
  if (estimate === certified) return 15;
  return -Math.log10(Math.abs(estimate - certified) / Math.abs(certified));
}

describe('WLS against NIST StRD certified values', () => {
  it('fits Norris to at least 12 significant digits (coefficients, SDs, residual SD, R²)', () => {
    // Source: NIST StRD "Norris", test/reference/strd-norris.json (certified to 15 digits).
    const ref = reference('norris');
    const data = ref.data as { x: number[]; y: number[] };
    const c = ref.certified as { B0: number; B1: number; sd_B0: number; sd_B1: number; residual_sd: number; r_squared: number };
    const fit = solveWls({ columns: [data.x], y: data.y });
    expect(digits(fit.intercept, c.B0)).toBeGreaterThanOrEqual(12);
    expect(digits(fit.coefficients[0]!, c.B1)).toBeGreaterThanOrEqual(12);
    expect(digits(fit.interceptStandardError!, c.sd_B0)).toBeGreaterThanOrEqual(12);
    expect(digits(fit.standardErrors![0]!, c.sd_B1)).toBeGreaterThanOrEqual(12);
    expect(digits(Math.sqrt(fit.residualVariance!), c.residual_sd)).toBeGreaterThanOrEqual(12);
    expect(digits(fit.weightedR2!, c.r_squared)).toBeGreaterThanOrEqual(12);
  });

  it('fits Longley to at least 9 significant digits on every coefficient (and its SD)', () => {
    // Source: NIST StRD "Longley", test/reference/strd-longley.json (certified to 15 digits).
    const ref = reference('longley');
    const rows = (ref.data as { rows: number[][] }).rows;
    const c = ref.certified as unknown as Certified;
    const columns = [1, 2, 3, 4, 5, 6].map((j) => rows.map((r) => r[j]!));
    const fit = solveWls({ columns, y: rows.map((r) => r[0]!) });
    const all = [fit.intercept, ...fit.coefficients];
    const ses = [fit.interceptStandardError!, ...fit.standardErrors!];
    for (let k = 0; k < 7; k++) {
      expect(digits(all[k]!, c.estimate[k]!)).toBeGreaterThanOrEqual(9);
      expect(digits(ses[k]!, c.sd_estimate[k]!)).toBeGreaterThanOrEqual(9);
    }
    expect(digits(Math.sqrt(fit.residualVariance!), c.residual_sd)).toBeGreaterThanOrEqual(9);
    expect(digits(fit.weightedR2!, c.r_squared)).toBeGreaterThanOrEqual(9);
  });

  it('fits the Pontius quadratic to at least 10 significant digits', () => {
    // Source: NIST StRD "Pontius", test/reference/strd-pontius.json (certified to 15 digits).
    const ref = reference('pontius');
    const data = ref.data as { x: number[]; y: number[] };
    const c = ref.certified as unknown as Certified;
    const fit = solveWls({ columns: [data.x, data.x.map((x) => x * x)], y: data.y });
    const all = [fit.intercept, ...fit.coefficients];
    const ses = [fit.interceptStandardError!, ...fit.standardErrors!];
    for (let k = 0; k < 3; k++) {
      expect(digits(all[k]!, c.estimate[k]!)).toBeGreaterThanOrEqual(10);
      expect(digits(ses[k]!, c.sd_estimate[k]!)).toBeGreaterThanOrEqual(10);
    }
    expect(digits(Math.sqrt(fit.residualVariance!), c.residual_sd)).toBeGreaterThanOrEqual(10);
  });
});

function generated(seed: number, n: number, p: number): { columns: Float64Array[]; y: Float64Array; w: Float64Array } {
  const rng = createRng(seed);
  const columns = Array.from({ length: p }, () => new Float64Array(n));
  const y = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let f = 0.7;
    for (let j = 0; j < p; j++) {
      columns[j]![i] = sampleNormal(rng) * (j + 1) + j;
      f += (j % 2 === 0 ? 1 : -0.5) * columns[j]![i]!;
    }
    y[i] = f + sampleNormal(rng);
    w[i] = 1 + Math.floor(rng.next() * 4);
  }
  return { columns, y, w };
}

describe('WLS identities', () => {
  it('gives the same fit with integer weights as with each row repeated that many times', () => {
    // Source: identity Σ wᵢ eᵢ² = Σ over repeated rows of eᵢ² (needs no reference code).
    const { columns, y, w } = generated(1, 60, 3);
    const weighted = solveWls({ columns, y, weights: w });
    const repCols: number[][] = columns.map(() => []);
    const repY: number[] = [];
    for (let i = 0; i < y.length; i++) {
      for (let c = 0; c < w[i]!; c++) {
        columns.forEach((col, j) => repCols[j]!.push(col[i]!));
        repY.push(y[i]!);
      }
    }
    const repeated = solveWls({ columns: repCols, y: repY });
    expect(weighted.intercept).toBeCloseTo(repeated.intercept, 11);
    weighted.coefficients.forEach((b, j) => expect(b).toBeCloseTo(repeated.coefficients[j]!, 11));
    expect(weighted.weightedR2!).toBeCloseTo(repeated.weightedR2!, 12);
    expect(weighted.weightedSse).toBeCloseTo(repeated.weightedSse, 9);
  });

  it('agrees with ml-regression on the rows multiplied by √w (well-conditioned data)', () => {
    // Source: ml-regression 6.3.0 MultivariateLinearRegression, without its own intercept: the √w column
    // carries the intercept, as WLS ≡ OLS on rows scaled by √w.
    const { columns, y, w } = generated(2, 200, 4);
    const fit = solveWls({ columns, y, weights: w });
    const xs: number[][] = [];
    const ys: number[][] = [];
    for (let i = 0; i < y.length; i++) {
      const s = Math.sqrt(w[i]!);
      xs.push([s, ...columns.map((c) => s * c[i]!)]);
      ys.push([s * y[i]!]);
    }
    const ml = new MultivariateLinearRegression(xs, ys, { intercept: false, statistics: false });
    expect(fit.intercept).toBeCloseTo(ml.weights[0]![0]!, 9);
    fit.coefficients.forEach((b, j) => expect(b).toBeCloseTo(ml.weights[j + 1]![0]!, 9));
  });

  it('leaves zero-weight rows out of the fit but still gives their fitted values', () => {
    const { columns, y } = generated(3, 50, 2);
    const w = new Float64Array(50).fill(1);
    w[7] = 0;
    const yBad = Float64Array.from(y);
    yBad[7] = 1e9;
    const a = solveWls({ columns, y: yBad, weights: w });
    const keep = [...Array(50).keys()].filter((i) => i !== 7);
    const b = solveWls({ columns: columns.map((c) => keep.map((i) => c[i]!)), y: keep.map((i) => y[i]!) });
    expect(a.coefficients[0]).toBeCloseTo(b.coefficients[0]!, 12);
    expect(a.rows).toBe(49);
    expect(a.fitted[7]).toBeCloseTo(wlsPredict(a, [columns[0]![7]!, columns[1]![7]!]), 9);
  });

  it('scales a coefficient by 1/c when its column is scaled by c, leaving the fit unchanged', () => {
    const { columns, y, w } = generated(4, 80, 3);
    const base = solveWls({ columns, y, weights: w });
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 2 }), fc.double({ min: -6, max: 6, noNaN: true }), (j, lg) => {
        const c = 10 ** lg;
        const scaled = columns.map((col, k) => (k === j ? col.map((v) => v * c) : col));
        const fit = solveWls({ columns: scaled, y, weights: w });
        return (
          Math.abs(fit.coefficients[j]! * c - base.coefficients[j]!) <= 1e-9 * Math.abs(base.coefficients[j]!) &&
          Math.abs(fit.intercept - base.intercept) <= 1e-9 * (1 + Math.abs(base.intercept)) &&
          Math.abs(fit.weightedR2! - base.weightedR2!) < 1e-12
        );
      }),
      { numRuns: 50 },
    );
  });

  it('gives the hand-worked weighted slope of a straight line', () => {
    // Source: METHODS.md one-regressor WLS formula, by hand: x = 0,1,2, y = 1,3,2, w = 1,1,2.
    // x̄_w = (0+1+4)/4 = 1.25, ȳ_w = (1+3+4)/4 = 2; Σw(x−x̄)(y−ȳ) = 1.25 − 0.25 + 0 = 1,
    // Σw(x−x̄)² = 1.5625 + 0.0625 + 1.125 = 2.75; slope = 1/2.75 = 4/11.
    const fit = solveWls({ columns: [[0, 1, 2]], y: [1, 3, 2], weights: [1, 1, 2] });
    expect(fit.coefficients[0]).toBeCloseTo(4 / 11, 14);
    expect(fit.intercept).toBeCloseTo(2 - (4 / 11) * 1.25, 14);
    expect(fit.effectiveRows).toBeCloseTo(16 / 6, 14);
  });

  it('fits through the origin when asked', () => {
    // Source: by hand, slope = Σxy/Σx² = (2 + 8)/(1 + 4) = 2.
    const fit = solveWls({ columns: [[1, 2]], y: [2, 4], intercept: false });
    expect(fit.coefficients[0]).toBeCloseTo(2, 14);
    expect(fit.intercept).toBe(0);
  });
});

describe('WLS ridge prior', () => {
  const { columns, y, w } = generated(5, 120, 3);
  const ols = solveWls({ columns, y, weights: w });
  const target = [1, 0, 0.25];

  it('equals OLS as the strength goes to 0', () => {
    const fit = solveWls({ columns, y, weights: w, ridge: { strength: 1e-9, target } });
    fit.coefficients.forEach((b, j) => expect(b).toBeCloseTo(ols.coefficients[j]!, 8));
  });

  it('returns the target slopes as the strength grows without bound', () => {
    const fit = solveWls({ columns, y, weights: w, ridge: { strength: 1e13, target } });
    fit.coefficients.forEach((b, j) => expect(b).toBeCloseTo(target[j]!, 6));
  });

  it('pulls the intercept to its target too when given an intercept prior', () => {
    const fit = solveWls({ columns, y, weights: w, ridge: { strength: 1e13, target, intercept: { strength: 1e13, target: 1 } } });
    expect(fit.intercept).toBeCloseTo(1, 6);
  });

  it('shrinks a single centred slope by Σw / (Σw + λ)', () => {
    // Source: by hand — one standardised column: β_ridge − t = (β_ols − t) · Σw / (Σw + λ).
    const x = [0, 1, 2, 3];
    const yy = [1, 2, 2, 5];
    const o = solveWls({ columns: [x], y: yy });
    const r = solveWls({ columns: [x], y: yy, ridge: { strength: 4, target: [0.5] } });
    expect(r.coefficients[0]! - 0.5).toBeCloseTo(((o.coefficients[0]! - 0.5) * 4) / 8, 13);
  });

  it('solves a ridge system with more parameters than rows, and a constant column goes to its target', () => {
    const fit = solveWls({ columns: [[1, 2], [3, 3], [0, 5]], y: [1, 2], ridge: { strength: 1, target: [0, 0.7, 0] } });
    expect(fit.coefficients[1]).toBeCloseTo(0.7, 12);
    expect(fit.standardErrors).toBeNull();
  });
});

describe('WLS errors', () => {
  it('reports exact collinearity with the column it repeats', () => {
    const x = [1, 2, 3, 4, 5];
    try {
      solveWls({ columns: [x, x.map((v) => 2 * v + 1)], y: [1, 2, 3, 5, 4], names: ['coverage', 'recentRatio'] });
      expect.unreachable();
    } catch (e) {
      expect(isNearcastError(e, 'NEARCAST_SOLVER_SINGULAR')).toBe(true);
      expect((e as Error).message).toMatch(/recentRatio/);
    }
  });

  it('reports a constant column as duplicating the intercept', () => {
    expect(() => solveWls({ columns: [[2, 2, 2]], y: [1, 2, 3], names: ['flag'] })).toThrow(/flag does not vary/);
  });

  it('names a non-finite value, a negative weight and mismatched lengths', () => {
    expect(() => solveWls({ columns: [[1, NaN, 3]], y: [1, 2, 3] })).toThrow(/column 0 of row 1 must be finite/);
    expect(() => solveWls({ columns: [[1, 2, 3]], y: [1, 2, 3], weights: [1, -1, 1] })).toThrow(/weight of row 1/);
    expect(() => solveWls({ columns: [[1, 2]], y: [1, 2, 3] })).toThrow(/2 values for 3 rows/);
  });
});
