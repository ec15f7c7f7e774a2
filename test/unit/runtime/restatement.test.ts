import { describe, expect, it } from 'vitest';
import type { Plan } from '../../../src/contracts/plan.ts';
import { restatementShare } from '../../../src/runtime/restatement.ts';

const plan = (item: string, adjusted: number[]) => ({ item, leads: adjusted.map((a) => ({ adjusted: a })) }) as unknown as Plan;

describe('the size of a restatement', () => {
  it('is the summed absolute change over the summed published quantity', () => {
    // By hand: |110-100| + |50-50| + |0-10| = 20 over 160.
    expect(restatementShare({ A: [100, 50], B: [10] }, [plan('A', [110, 50]), plan('B', [0])])).toBeCloseTo(20 / 160, 12);
  });

  it('counts a series that appeared or vanished in full', () => {
    expect(restatementShare({ A: [100] }, [plan('A', [100]), plan('B', [5])])).toBeCloseTo(5 / 100, 12);
    expect(restatementShare({ A: [100], B: [20] }, [plan('A', [100])])).toBeCloseTo(20 / 120, 12);
  });
});
