import { describe, expect, it } from 'vitest';
import { fnv1a32, partitionFor } from '../../../src/runtime/partitioner.ts';

describe('our partitioner', () => {
  it('hashes with 32-bit FNV-1a', () => {
    // Test vectors of FNV-1a 32 from the FNV reference (Fowler/Noll/Vo; recalled from memory).
    expect(fnv1a32('')).toBe(0x811c9dc5);
    expect(fnv1a32('a')).toBe(0xe40c292c);
    expect(fnv1a32('foobar')).toBe(0xbf9cf968);
  });

  it('puts a location on the same partition every time, within range', () => {
    for (const loc of ['DC-NORTH', 'DC-SOUTH', 'DC-COAST', 'X']) {
      const p = partitionFor(loc, 6);
      expect(p).toBe(fnv1a32(loc) % 6);
      expect(p).toBeGreaterThanOrEqual(0);
      expect(p).toBeLessThan(6);
    }
  });

  it('refuses a partition count that is not a positive whole number', () => {
    expect(() => partitionFor('DC-NORTH', 0)).toThrow(/positive whole number/);
    expect(() => partitionFor('DC-NORTH', 1.5)).toThrow(/positive whole number/);
  });
});
