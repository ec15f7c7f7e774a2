import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CUSUM_START, cusumShiftEstimate, cusumStep, tabularCusum } from '../../../src/monitoring/cusum.ts';

const ref = (name: string) => JSON.parse(readFileSync(new URL(`../../reference/${name}`, import.meta.url), 'utf8'));

describe('the tabular CUSUM', () => {
  // Source: NIST/SEMATECH e-Handbook of Statistical Methods 6.3.2.3, tabular CUSUM example
  // (test/reference/nist-cusum-example.json). Printed values are 2 dp; half-cent ties round either way,
  // so the check is to half a unit in the second decimal; the unrounded columns are compared tightly.
  const nist = ref('nist-cusum-example.json');
  const rows = tabularCusum(nist.data.x, nist.data.target, nist.data.k, nist.data.h);

  it('reproduces the e-Handbook S_hi and S_lo columns to the printed precision', () => {
    nist.expected.printed_2dp.forEach((printed: number[], i: number) => {
      expect(Math.abs(rows[i]!.hi - printed[1]!)).toBeLessThanOrEqual(0.005 + 1e-9);
      expect(Math.abs(rows[i]!.lo - printed[2]!)).toBeLessThanOrEqual(0.005 + 1e-9);
    });
  });

  it('matches the exact recomputation of the e-Handbook columns', () => {
    rows.forEach((r, i) => {
      expect(r.hi).toBeCloseTo(nist.expected.computed_unrounded.S_hi[i], 10);
      expect(r.lo).toBeCloseTo(nist.expected.computed_unrounded.S_lo[i], 10);
    });
  });

  it('signals upward from group 14 on and never downward, as the e-Handbook stars show', () => {
    const up = rows.flatMap((r, i) => (r.signal === 'up' ? [i + 1] : []));
    expect(up).toEqual(nist.expected.signal_groups_S_hi);
    expect(rows.some((r) => r.signal === 'down')).toBe(false);
    expect(up[0]).toBe(nist.expected.first_signal_group_S_hi);
  });

  // Source: Montgomery & Runger, Applied Statistics and Probability for Engineers, Example 16-6, Table 16-8
  // (test/reference/textbook-tabular-cusum-example.json), mu0 = 99, K = 1, H = 10, printed to 1 dp.
  const mr = ref('textbook-tabular-cusum-example.json');
  const mrRows = tabularCusum(mr.data.x, mr.data.mu0, mr.data.K, mr.data.H);

  it('reproduces the textbook sH and sL columns of Table 16-8', () => {
    mr.expected.printed_table_16_8.rows.forEach((printed: number[], i: number) => {
      expect(mrRows[i]!.hi).toBeCloseTo(printed[0]!, 6);
      expect(mrRows[i]!.lo).toBeCloseTo(printed[2]!, 6);
    });
  });

  it('counts the runs nH and nL as recomputed from the table (the print shows 0 for nH at observation 20, a misprint)', () => {
    expect(mrRows.map((r) => r.nHi)).toEqual(mr.expected.recomputed_counters.nH);
    expect(mrRows.map((r) => r.nLo)).toEqual(mr.expected.recomputed_counters.nL);
  });

  it('finds the textbook process in control: neither sum reaches H = 10', () => {
    expect(mrRows.every((r) => r.signal === null)).toBe(true);
    expect(Math.max(...mrRows.map((r) => r.hi))).toBeCloseTo(mr.expected.max_sH, 6);
    expect(Math.max(...mrRows.map((r) => r.lo))).toBeCloseTo(mr.expected.max_sL, 6);
  });

  it('estimates the new mean after a signal as target + k + S/N', () => {
    // By hand: after 3, 4, 5 with target 0 and k = 0.5: S = 2.5 + 3.5 + 4.5 = 10.5 over N = 3 → 0.5 + 3.5 = 4 = mean(3, 4, 5).
    let s = CUSUM_START;
    for (const x of [3, 4, 5]) s = cusumStep(s, x, 0, 0.5, 100).state;
    expect(cusumShiftEstimate(s, 0, 0.5, 'up')).toBeCloseTo(4, 12);
    expect(cusumShiftEstimate(s, 0, 0.5, 'down')).toBeNull();
  });
});
