import { describe, expect, it } from 'vitest';
import {
  addDispersionObservation,
  addToDispersionPool,
  dispersionByBand,
  dispersionEstimate,
  emptyDispersion,
  emptyDispersionPool,
  estimateDispersion,
  mergeDispersion,
} from '../../../src/stats/dispersion.ts';
import { createRng, sampleNegBinomial, samplePoisson } from '../../../src/stats/random.ts';
import { volumeBandOf } from '../../../src/stats/volume-band.ts';

describe('dispersion (method of moments)', () => {
  it('gives phi = 0.5 for counts 0 and 4 around a mean of 2', () => {
    // Source: by hand, ((0−2)² − 2 + (4−2)² − 2) / (2² + 2²) = 4 / 8.
    expect(estimateDispersion([0, 4], [2, 2])).toBe(0.5);
  });

  it('reads a sample tighter than Poisson as Poisson (phi clipped at 0)', () => {
    expect(estimateDispersion([5, 5, 5, 5], [5, 5, 5, 5])).toBe(0);
  });

  it('recovers the dispersion of generated negative-binomial counts with varying means', () => {
    const rng = createRng(99);
    const observed: number[] = [];
    const expected: number[] = [];
    for (let i = 0; i < 20_000; i++) {
      const mu = 5 + (i % 40);
      expected.push(mu);
      observed.push(sampleNegBinomial(rng, mu, 0.1));
    }
    expect(estimateDispersion(observed, expected)).toBeGreaterThan(0.09);
    expect(estimateDispersion(observed, expected)).toBeLessThan(0.11);
  });

  it('estimates near 0 for Poisson counts', () => {
    const rng = createRng(3);
    const mus = Array.from({ length: 20_000 }, (_, i) => 1 + (i % 30));
    const phi = estimateDispersion(mus.map((m) => samplePoisson(rng, m)), mus);
    expect(phi).toBeLessThan(0.005);
  });

  it('merges accumulators to the same estimate as one pass', () => {
    const a = emptyDispersion();
    const b = emptyDispersion();
    addDispersionObservation(a, 0, 2);
    addDispersionObservation(b, 4, 2);
    expect(dispersionEstimate(mergeDispersion(a, b))).toBe(0.5);
  });

  it('pools by volume band and lets a thin band borrow its nearest neighbour', () => {
    const pool = emptyDispersionPool();
    for (let i = 0; i < 40; i++) addToDispersionPool(pool, 20, i % 2 === 0 ? 0 : 4, 2);
    const byBand = dispersionByBand(pool, { minObservations: 30 });
    expect(volumeBandOf(20)).toBe('10-50');
    expect(byBand['10-50']).toBe(0.5);
    expect(byBand['50-400']).toBe(0.5);
    expect(byBand['under-1']).toBe(0.5);
  });

  it('names the field when the arrays differ in length or a count is negative', () => {
    expect(() => estimateDispersion([1, 2], [1])).toThrow(/one mean per observation/);
    expect(() => estimateDispersion([-1], [1])).toThrow(/observed/);
  });
});
