import { describe, expect, it } from 'vitest';
import { ParsedParts } from '../../../src/runtime/parsed-parts.ts';

describe('saved parts parsed as they are read', () => {
  it('parses a part only when it is read, and each read gives the saved value', () => {
    const parsed: string[] = [];
    const parts = new ParsedParts(
      new Map([
        ['s:COLA-1L', '{"tail":1}'],
        ['c:COLA-1L', '{"m":null}'],
      ]),
      (text, key) => {
        parsed.push(key);
        return JSON.parse(text) as unknown;
      },
    );
    expect([...parts.keys()]).toEqual(['s:COLA-1L', 'c:COLA-1L']);
    expect(parts.size).toBe(2);
    expect(parts.has('c:COLA-1L')).toBe(true);
    expect(parsed).toEqual([]);
    expect(parts.get('c:COLA-1L')).toEqual({ m: null });
    expect(parts.get('f:COLA-1L')).toBeUndefined();
    expect(parsed).toEqual(['c:COLA-1L']);
    expect(Object.fromEntries(parts)).toEqual({ 's:COLA-1L': { tail: 1 }, 'c:COLA-1L': { m: null } });
  });
});
