import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { ascendingOrder } from '../../../src/stats/ascending-order.ts';

// The reference is the engine's own comparison sort by (value, index), which ECMAScript requires to be stable.
function byComparison(values: readonly number[], candidates: Int32Array): number[] {
  return Array.from(candidates).sort((a, b) => (values[a]! < values[b]! ? -1 : values[a]! > values[b]! ? 1 : a - b));
}

// Few distinct magnitudes, both signs, both zeros, subnormals and extremes: ties and every key region.
const value = fc.oneof(
  fc.constantFrom(0, -0, 1, -1, 0.5, 1e-310, -1e-310, Number.MAX_VALUE, -Number.MAX_VALUE, Number.MIN_VALUE, 2 ** 52 + 1),
  fc.double({ noNaN: true, noDefaultInfinity: false }),
  fc.integer({ min: -3, max: 3 }).map((k) => 1 + k * 1e-9),
);

describe('ascendingOrder: the order of a stable sort by value', () => {
  it('equals a comparison sort by (value, index) on short and long inputs (radix path from 256 values)', () => {
    fc.assert(
      fc.property(fc.array(value, { minLength: 0, maxLength: 1200 }), fc.integer({ min: 1, max: 4 }), (values, stride) => {
        const candidates = Int32Array.from({ length: Math.ceil(values.length / stride) }, (_, k) => k * stride);
        expect(Array.from(ascendingOrder(values, candidates))).toEqual(byComparison(values, candidates));
      }),
      { numRuns: 200 },
    );
  });

  it('sorts 100,000 ratios near 1 like the comparison sort', () => {
    const values = Array.from({ length: 100_000 }, (_, i) => 1 + Math.sin(i * 12.9898) * 0.3 + (i % 7 === 0 ? 0 : 1e-15 * (i % 5)));
    const candidates = Int32Array.from({ length: values.length }, (_, i) => i);
    expect(Array.from(ascendingOrder(values, candidates))).toEqual(byComparison(values, candidates));
  });
});
