import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { hash53 } from '../../../src/sensing/hash.ts';
import { HashIndex } from '../../../src/sensing/hash-index.ts';

// The index must answer exactly as a Map keyed by the same numbers would (the reference here is the language's own
// Map), through growth, replaced values, clearing and keys that share their low bits.

const key53 = fc.oneof(
  fc.integer({ min: 0, max: 2 ** 53 - 1 }),
  // Same low 32 bits, different high bits: collide on the low half.
  fc.integer({ min: 0, max: 2 ** 21 - 1 }).map((hi) => hi * 4_294_967_296 + 12345),
  fc.string().map(hash53),
);

describe('HashIndex', () => {
  it('answers get/has/size like a Map over any sequence of sets, adds and clears', () => {
    const op = fc.oneof(
      fc.record({ kind: fc.constant('set' as const), key: key53, value: fc.integer({ min: 0, max: 2 ** 31 - 1 }) }),
      fc.record({ kind: fc.constant('add' as const), key: key53 }),
      fc.record({ kind: fc.constant('clear' as const) }),
    );
    fc.assert(
      fc.property(fc.array(op, { maxLength: 400 }), fc.array(key53, { maxLength: 50 }), (ops, probes) => {
        const index = new HashIndex();
        const ref = new Map<number, number>();
        for (const o of ops) {
          if (o.kind === 'set') {
            index.set(o.key, o.value);
            ref.set(o.key, o.value);
          } else if (o.kind === 'add') {
            index.add(o.key);
            if (!ref.has(o.key)) ref.set(o.key, 0);
          } else {
            index.clear();
            ref.clear();
          }
        }
        expect(index.size).toBe(ref.size);
        for (const k of [...ref.keys(), ...probes]) {
          expect(index.has(k)).toBe(ref.has(k));
          expect(index.get(k)).toBe(ref.get(k) ?? -1);
        }
      }),
    );
  });

  it('keeps every one of 50,000 keys through repeated growth', () => {
    const index = new HashIndex();
    for (let i = 0; i < 50_000; i++) index.set(hash53(`event-${i}`), i);
    expect(index.size).toBe(50_000);
    for (let i = 0; i < 50_000; i++) expect(index.get(hash53(`event-${i}`))).toBe(i);
    expect(index.get(hash53('event-50000'))).toBe(-1);
  });

  it('indexes and sets sharing one buffer answer each like its own Map, through growth of any of them', () => {
    const shapes = fc.array(fc.record({ capacity: fc.nat(40), values: fc.boolean() }), { minLength: 3, maxLength: 3 });
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.integer({ min: 0, max: 2 }), key53, fc.integer({ min: 0, max: 2 ** 31 - 1 })), { maxLength: 300 }), shapes, (ops, given) => {
        const indexes = HashIndex.together(given);
        const refs = [new Map<number, number>(), new Map<number, number>(), new Map<number, number>()];
        for (const [which, key, value] of ops) {
          if (given[which]!.values) {
            indexes[which]!.set(key, value);
            refs[which]!.set(key, value);
          } else {
            indexes[which]!.add(key);
            refs[which]!.set(key, 0);
          }
        }
        refs.forEach((ref, k) => {
          expect(indexes[k]!.size).toBe(ref.size);
          for (const [key, value] of ref) expect(indexes[k]!.get(key)).toBe(value);
          for (const [, key] of ops) expect(indexes[k]!.has(key)).toBe(ref.has(key));
        });
      }),
    );
  });

  it('as a set keeps 8 bytes a slot and refuses a value, and a table sized for n keys holds them without growing', () => {
    const set = new HashIndex({ capacity: 600, values: false });
    const bytes = set.byteLength;
    for (let i = 0; i < 600; i++) set.add(hash53(`event-${i}`));
    expect(set.byteLength).toBe(bytes);
    expect(bytes).toBe(8 * Math.ceil(600 / 0.6));
    expect(set.get(hash53('event-3'))).toBe(0);
    expect(() => set.set(hash53('event-3'), 4)).toThrow(/set/);
  });

  it('refuses a key that is not a finite number instead of losing it', () => {
    expect(() => new HashIndex().set(NaN, 1)).toThrow(/finite/);
  });
});
