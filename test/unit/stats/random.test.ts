import { describe, expect, it } from 'vitest';
import jStat from 'jstat';
import {
  createRng,
  sampleGamma,
  sampleInteger,
  sampleNegBinomial,
  sampleNormal,
  samplePoisson,
  type Rng,
} from '../../../src/stats/random.ts';
import { negBinomialPmf, poissonPmf } from '../../../src/stats/count-distributions.ts';

/**
 * Pearson chi-square p-value of integer samples against a pmf, cells with expected count < 5 merged into the
 * tails. Source of the p-value: jstat 1.9.6 chisquare.cdf.
 */
function chiSquarePValue(samples: number[], pmf: (k: number) => number): number {
  const n = samples.length;
  const counts = new Map<number, number>();
  for (const s of samples) counts.set(s, (counts.get(s) ?? 0) + 1);
  const max = Math.max(...samples);
  const cells: { obs: number; exp: number }[] = [];
  let obs = 0;
  let exp = 0;
  let cum = 0;
  for (let k = 0; k <= max; k++) {
    const p = pmf(k);
    cum += p;
    obs += counts.get(k) ?? 0;
    exp += n * p;
    if (exp >= 5 && n * (1 - cum) >= 5) {
      cells.push({ obs, exp });
      obs = 0;
      exp = 0;
    }
  }
  cells.push({ obs: obs, exp: exp + n * Math.max(0, 1 - cum) });
  let chi = 0;
  for (const c of cells) chi += ((c.obs - c.exp) * (c.obs - c.exp)) / c.exp;
  return 1 - jStat.chisquare.cdf(chi, cells.length - 1);
}

function draw(n: number, f: () => number): number[] {
  return Array.from({ length: n }, f);
}

function meanVar(xs: number[]): [number, number] {
  const m = xs.reduce((a, b) => a + b, 0) / xs.length;
  return [m, xs.reduce((a, b) => a + (b - m) * (b - m), 0) / (xs.length - 1)];
}

describe('seeded generator', () => {
  it('repeats the same stream for the same seed and differs for another', () => {
    const a = createRng(42);
    const b = createRng(42);
    const c = createRng(43);
    const sa = draw(5, () => a.next());
    expect(draw(5, () => b.next())).toEqual(sa);
    expect(draw(5, () => c.next())).not.toEqual(sa);
  });

  it('resumes from a saved state exactly', () => {
    const a = createRng(7);
    draw(100, () => a.next());
    const saved = JSON.parse(JSON.stringify(a.state())) as [number, number, number, number];
    const expected = draw(10, () => a.next());
    const b = createRng(saved);
    expect(draw(10, () => b.next())).toEqual(expected);
  });

  it('is uniform on [0, 1) by a 20-cell chi-square test', () => {
    const rng = createRng(2024);
    const samples = draw(100_000, () => Math.floor(rng.next() * 20));
    expect(Math.min(...samples)).toBeGreaterThanOrEqual(0);
    expect(Math.max(...samples)).toBeLessThan(20);
    expect(chiSquarePValue(samples, () => 1 / 20)).toBeGreaterThan(1e-4);
  });

  it('draws integers over the whole inclusive range', () => {
    const rng = createRng(5);
    const xs = draw(2000, () => sampleInteger(rng, -2, 2));
    expect(new Set(xs)).toEqual(new Set([-2, -1, 0, 1, 2]));
  });
});

describe('samplers', () => {
  const check = (rng: Rng, mu: number) => {
    const xs = draw(40_000, () => samplePoisson(rng, mu));
    return chiSquarePValue(xs, (k) => poissonPmf(k, mu));
  };

  it('draws Poisson counts matching the exact pmf, by inversion and by rejection', () => {
    // Source of the reference pmf: poissonPmf, itself checked against jstat in count-distributions.test.ts.
    const rng = createRng(11);
    for (const mu of [0.05, 2, 9.5, 10, 15, 60, 1000]) expect(check(rng, mu)).toBeGreaterThan(1e-4);
  });

  it('draws negative-binomial counts matching the exact pmf and its variance', () => {
    const rng = createRng(12);
    for (const [mean, phi] of [[0.8, 1.2], [20, 0.1], [300, 0.02]] as const) {
      const xs = draw(40_000, () => sampleNegBinomial(rng, mean, phi));
      expect(chiSquarePValue(xs, (k) => negBinomialPmf(k, mean, phi))).toBeGreaterThan(1e-4);
      const [m, v] = meanVar(xs);
      expect(Math.abs(m - mean) / mean).toBeLessThan(0.03);
      expect(Math.abs(v - (mean + phi * mean * mean)) / (mean + phi * mean * mean)).toBeLessThan(0.06);
    }
  });

  it('draws gamma deviates whose decile cells are equally filled', () => {
    // Source: jstat 1.9.6 gamma.inv gives the cell edges.
    const rng = createRng(13);
    for (const [shape, scale] of [[0.3, 2], [1, 1], [4.5, 0.2], [200, 3]] as const) {
      const edges = Array.from({ length: 9 }, (_, i) => jStat.gamma.inv((i + 1) / 10, shape, scale));
      const cells = draw(40_000, () => {
        const x = sampleGamma(rng, shape, scale);
        let c = 0;
        while (c < 9 && x > edges[c]!) c++;
        return c;
      });
      expect(chiSquarePValue(cells, () => 0.1)).toBeGreaterThan(1e-4);
    }
  });

  it('draws standard normal deviates with mean 0 and variance 1', () => {
    const rng = createRng(14);
    const [m, v] = meanVar(draw(50_000, () => sampleNormal(rng)));
    expect(Math.abs(m)).toBeLessThan(0.02);
    expect(Math.abs(v - 1)).toBeLessThan(0.03);
  });

  it('rejects a negative mean', () => {
    expect(() => samplePoisson(createRng(1), -1)).toThrow(/mu must be/);
  });
});
