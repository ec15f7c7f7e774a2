import { describe, expect, it } from 'vitest';
import { levelRatio } from '../../../src/sensing/baseline-lookup.ts';
import { adaptiveLevel } from '../../../src/sensing/adaptive-window.ts';
import { evidenceWeight, fitSlabPrior, realChangeProbability } from '../../../src/sensing/spike-and-slab.ts';
import { successiveDifferenceVariance } from '../../../src/sensing/successive-differences.ts';
import { capFactors } from '../../../src/sensing/weights.ts';

describe('evidence-gated shrinkage (spike and slab)', () => {
  it('follows the posterior probability of a real change, worked by hand', () => {
    // δ = 0.1, v = 0.0025 (z = 2), τ² = 0.01, π0 = 0.5: LR = √(v/(τ²+v))·exp(½δ²(1/v − 1/(τ²+v)))
    // = 0.44721·e^1.6 = 0.44721·4.95303 = 2.21506; P(real) = LR/(1 + LR) = 0.68896; weight = P·τ²/(τ²+v) = 0.55117.
    const prior = { noChange: 0.5, spread2: 0.01 };
    expect(realChangeProbability(0.1, 0.0025, prior)).toBeCloseTo(0.68896, 4);
    expect(evidenceWeight(0.1, 0.0025, prior)).toBeCloseTo(0.55117, 4);
    // Within its own noise a deviation barely moves anything; far outside it is followed almost fully.
    expect(evidenceWeight(0.01, 0.0025, { noChange: 0.95, spread2: 0.01 })).toBeLessThan(0.05);
    expect(evidenceWeight(0.4, 0.0025, { noChange: 0.95, spread2: 0.01 })).toBeGreaterThan(0.79);
  });

  it('estimates few real changes among many stable series (empirical Bayes)', () => {
    const deltas = [...Array.from({ length: 45 }, (_, i) => 0.02 * Math.sin(i * 1.7)), 0.3, -0.25, 0.35, 0.28, -0.3];
    const v = deltas.map(() => 0.0004);
    const prior = fitSlabPrior(deltas, v, { noChange: 0.8, spread2: 0.04 }, { noChangeMin: 0.5, noChangeMax: 0.999, spreadMin: 0.01, spreadMax: 1 });
    expect(prior.noChange).toBeGreaterThan(0.85);
    expect(prior.noChange).toBeLessThan(0.95);
    expect(Math.sqrt(prior.spread2)).toBeGreaterThan(0.2);
  });
});

describe('robust helpers', () => {
  it("measures week-to-week noise from successive differences (von Neumann's half mean square)", () => {
    // Differences 2, −2, 2: mean square 4, half of it 2.
    expect(successiveDifferenceVariance([10, 12, 10, 12])).toBe(2);
    expect(successiveDifferenceVariance([1, NaN, 1])).toBeNaN();
  });

  it('caps any one series at its share of the weight by water-filling', () => {
    // One series of 10 among nine of 1, cap 0.2: t with t = 0.2 (t + 9) → t = 2.25.
    const f = capFactors([10, 1, 1, 1, 1, 1, 1, 1, 1, 1], 0.2);
    expect(f[0]).toBeCloseTo(0.225, 12);
    expect(Array.from(f.subarray(1))).toEqual(Array(9).fill(1));
  });

  it('follows a level step quickly and a stable level over many weeks', () => {
    const stable = Float64Array.from([1.01, 0.99, 1.02, 0.98, 1.0, 1.01, 0.99, 1.0]);
    expect(adaptiveLevel(stable, 0.0004, 0.5, 4, 1.5, 3).shortShare).toBe(0);
    const step = Float64Array.from([1.35, 1.36, 1.0, 1.01, 0.99, 1.0, 1.0, 1.0]); // age 0 = newest week
    expect(adaptiveLevel(step, 0.0004, 0.5, 4, 1.5, 3).shortShare).toBe(1);
  });
});

describe('rebasing onto a re-planned baseline', () => {
  const version = (v: number, values: number[]) => ({
    version: v,
    eventHash: v,
    publishedMs: 0,
    knownMs: 0,
    knownDay: 0,
    weeks: Int32Array.from(values.map((_, i) => 7 * i)),
    quantities: Float64Array.from(values),
  });
  it('measures the new level over the weeks both versions cover', () => {
    expect(levelRatio(version(1, [100, 100, 100, 100]), version(2, [130, 130, 130, 130]))).toBeCloseTo(1.3, 12);
  });
  it('does not read version-to-version wobble as a re-plan', () => {
    expect(levelRatio(version(1, [100, 103, 97, 101]), version(2, [102, 99, 100, 98]))).toBe(1);
  });
});
