import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { Arena } from '../../../src/sensing/arena.ts';

type Ask = { kind: 'f64' | 'u8' | 'i32'; n: number };
const ask = fc.record({ kind: fc.constantFrom<'f64' | 'u8' | 'i32'>('f64', 'u8', 'i32'), n: fc.integer({ min: 0, max: 300 }) });

function hand(arena: Arena, a: Ask): Float64Array | Uint8Array | Int32Array {
  return a.kind === 'f64' ? arena.f64(a.n) : a.kind === 'u8' ? arena.u8(a.n) : arena.i32(a.n);
}

describe('Arena: scratch arrays for one recompute, reused by the next', () => {
  it('hands out zeroed arrays of the asked length that never share memory, across resets', () => {
    // Small blocks so that a run crosses many block boundaries.
    fc.assert(
      fc.property(fc.array(fc.array(ask, { maxLength: 40 }), { minLength: 1, maxLength: 5 }), (rounds) => {
        const arena = new Arena(1024);
        for (const round of rounds) {
          arena.reset();
          const given = round.map((a) => hand(arena, a));
          given.forEach((arr, k) => {
            expect(arr.length).toBe(round[k]!.n);
            expect(arr.every((v) => v === 0)).toBe(true);
            arr.fill(k + 1);
          });
          // Had two arrays overlapped, the later fill would show through the earlier one.
          given.forEach((arr, k) => expect(arr.every((v) => v === k + 1)).toBe(true));
        }
      }),
    );
  });

  it('keeps its blocks: the same pattern of requests allocates nothing new after the first recompute', () => {
    const arena = new Arena(4096);
    const pattern = () => {
      arena.reset();
      for (let i = 0; i < 50; i++) arena.f64(30).fill(1);
      arena.u8(5);
    };
    pattern();
    const kept = arena.retainedBytes;
    pattern();
    pattern();
    expect(arena.retainedBytes).toBe(kept);
    expect(kept).toBeGreaterThan(0);
  });

  it('serves arrays larger than a block on their own', () => {
    const arena = new Arena(64);
    const big = arena.f64(100);
    big.fill(3);
    expect(big.length).toBe(100);
    expect(arena.f64(2).every((v) => v === 0)).toBe(true);
    expect(big.every((v) => v === 3)).toBe(true);
  });
});
