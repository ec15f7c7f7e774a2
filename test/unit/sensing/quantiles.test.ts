import jStat from 'jstat';
import { describe, expect, it } from 'vitest';
import { cumulativeQuantiles, leadQuantiles } from '../../../src/sensing/quantiles.ts';

// Reference: jstat's negative binomial (r = 1/φ successes, p = 1/(1 + φμ), so mean μ and Var = μ + φμ²).
function referenceQuantile(p: number, mean: number, phi: number): number {
  const r = 1 / phi;
  const q = 1 / (1 + phi * mean);
  let k = 0;
  while (jStat.negbin.cdf(k, r, q) < p) k++;
  return k;
}

describe('predictive quantiles', () => {
  it('add the negative-binomial quantiles of the uncertain rest to the certain part', () => {
    const levels = [0.1, 0.5, 0.9];
    const q = leadQuantiles({ certain: 40, mean: 60, phi: 0.05 }, levels);
    expect(q.p10).toBe(40 + referenceQuantile(0.1, 60, 0.05));
    expect(q.p50).toBe(40 + referenceQuantile(0.5, 60, 0.05));
    expect(q.p90).toBe(40 + referenceQuantile(0.9, 60, 0.05));
    expect(leadQuantiles({ certain: 12.5, mean: 0, phi: 0.05 }, levels)).toEqual({ p10: 12.5, p50: 12.5, p90: 12.5 });
  });

  it('give the p90 of a sum of weeks below the sum of the weeks’ p90s, and never fall as leads are added', () => {
    const weeks = [0, 1, 2, 3].map(() => ({ certain: 0, mean: 100, phi: 0.02 }));
    const cum = cumulativeQuantiles(weeks, [0.1, 0.9], 0.5);
    const single = leadQuantiles(weeks[0]!, [0.1, 0.9]);
    expect(cum[3]!.p90!).toBeLessThan(4 * single.p90!);
    expect(cum[3]!.p10!).toBeGreaterThan(4 * single.p10!);
    for (let k = 1; k < 4; k++) expect(cum[k]!.p90!).toBeGreaterThanOrEqual(cum[k - 1]!.p90!);
    // Variance of the sum by hand: Σμ + Σφμ² + 2ρ Σ_{i<j} √φᵢφⱼ μᵢμⱼ = 400 + 4·200 + 2·0.5·6·200 = 2400,
    // i.e. φ_sum = (2400 − 400)/400² = 0.0125 for a mean of 400.
    expect(cum[3]!.p90).toBe(referenceQuantile(0.9, 400, 0.0125));
  });
});
