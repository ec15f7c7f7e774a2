import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ewmaHalfWidth, ewmaSignal, ewmaStart, ewmaStep } from '../../../src/monitoring/ewma.ts';

// Source: NIST/SEMATECH e-Handbook of Statistical Methods 6.3.2.4, EWMA example
// (test/reference/nist-ewma-example.json): lambda = 0.3, EWMA_0 = target = 50, s = 2.0539 (historical), k = 3.
const nist = JSON.parse(readFileSync(new URL('../../reference/nist-ewma-example.json', import.meta.url), 'utf8'));
const { x, lambda, EWMA_0, target, s, k } = nist.data;

function run() {
  const out = [ewmaStart(EWMA_0)];
  for (const v of x as number[]) out.push(ewmaStep(out.at(-1)!, v, lambda));
  return out;
}

describe('the EWMA statistic and limits', () => {
  const states = run();

  it('reproduces all 21 printed EWMA values to the printed 2 dp', () => {
    states.forEach((st, i) => expect(Math.abs(st.z - nist.expected.ewma_printed_2dp[i])).toBeLessThanOrEqual(0.005 + 1e-9));
  });

  it('matches the exact recomputation of the EWMA values', () => {
    states.forEach((st, i) => expect(st.z).toBeCloseTo(nist.expected.computed_unrounded.ewma[i], 9));
  });

  it('gives the printed asymptotic limits 52.5884 and 47.4115 (the LCL printed from a rounded factor: one unit in the 4th decimal)', () => {
    const w = ewmaHalfWidth(s, lambda, k, Infinity);
    expect(Math.abs(target + w - nist.expected.UCL_printed)).toBeLessThan(1e-4);
    expect(Math.abs(target - w - nist.expected.LCL_printed)).toBeLessThan(1.5e-4);
    expect(target + w).toBeCloseTo(nist.expected.computed_unrounded.UCL_asymptotic, 9);
  });

  it('narrows the limits at the start as (1 − (1 − λ)^{2t}) says', () => {
    const [t1, t2] = nist.expected.computed_unrounded.time_varying_limits_t1_t2;
    expect(target - ewmaHalfWidth(s, lambda, k, 1)).toBeCloseTo(t1[0], 4);
    expect(target + ewmaHalfWidth(s, lambda, k, 2)).toBeCloseTo(t2[1], 9);
  });

  it('finds the process in control at every point, as the e-Handbook concludes', () => {
    expect(states.slice(1).every((st) => ewmaSignal(st, target, s, lambda, k) === null)).toBe(true);
  });
});
