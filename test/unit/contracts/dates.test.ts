import { describe, expect, it } from 'vitest';
import { isCalendarDate, parseTimestamp } from '../../../src/contracts/primitives.ts';
import { jsonDepth } from '../../../src/contracts/validate.ts';

describe('calendar dates', () => {
  it.each([
    ['2026-03-02', true],
    ['2024-02-29', true], // divisible by 4
    ['2023-02-29', false],
    ['1900-02-29', false], // divisible by 100, not by 400
    ['2000-02-29', true], // divisible by 400
    ['2026-04-30', true],
    ['2026-04-31', false],
    ['2026-12-31', true],
    ['2026-13-01', false],
    ['2026-00-10', false],
    ['2026-01-00', false],
    ['0100-01-01', true],
    ['0099-12-31', false], // years below 100 were never accepted
    ['2026-3-02', false],
    ['2026-03-02 ', false],
    ['2026/03/02', false],
    ['２０２６-03-02', false], // digits outside ASCII
    ['', false],
  ])('%s → %s', (text, expected) => {
    expect(isCalendarDate(text)).toBe(expected);
  });
});

describe('RFC 3339 timestamps', () => {
  it.each<[string, number | undefined]>([
    ['2026-03-02T08:15:00Z', Date.UTC(2026, 2, 2, 8, 15, 0)],
    ['2026-03-02t08:15:00z', Date.UTC(2026, 2, 2, 8, 15, 0)],
    ['2026-03-02T08:15:00+01:00', Date.UTC(2026, 2, 2, 7, 15, 0)],
    ['2026-03-02T08:15:00-05:30', Date.UTC(2026, 2, 2, 13, 45, 0)],
    ['2026-03-02T00:15:00+01:00', Date.UTC(2026, 2, 1, 23, 15, 0)], // the day before in UTC
    ['2026-03-02T08:15:00.5Z', Date.UTC(2026, 2, 2, 8, 15, 0, 500)],
    ['2026-03-02T08:15:00.12Z', Date.UTC(2026, 2, 2, 8, 15, 0, 120)],
    ['2026-03-02T08:15:00.123456789Z', Date.UTC(2026, 2, 2, 8, 15, 0, 123)], // digits past the ms dropped
    ['2026-03-02T08:15:00.9999Z', Date.UTC(2026, 2, 2, 8, 15, 0, 999)],
    ['2024-02-29T23:59:59Z', Date.UTC(2024, 1, 29, 23, 59, 59)],
    ['2026-03-02T08:15:00.1234567890Z', undefined], // ten fraction digits
    ['2026-03-02T08:15:00.Z', undefined],
    ['2026-03-02T08:15:00', undefined], // no offset
    ['2026-03-02T08:15Z', undefined],
    ['2026-03-02 08:15:00Z', undefined],
    ['2026-03-02T24:00:00Z', undefined],
    ['2026-03-02T08:60:00Z', undefined],
    ['2026-03-02T08:15:60Z', undefined],
    ['2026-03-02T08:15:00+24:00', undefined],
    ['2026-03-02T08:15:00+01:60', undefined],
    ['2026-03-02T08:15:00+0100', undefined],
    ['2023-02-29T08:15:00Z', undefined],
    ['2026-03-02T08:15:00Z\n', undefined],
    ['0099-03-02T08:15:00Z', undefined],
  ])('%s', (text, expected) => {
    expect(parseTimestamp(text)).toBe(expected);
  });

  it('agrees with Date.parse on every well-formed timestamp of a seeded sample', () => {
    let seed = 12345;
    const next = (n: number) => {
      seed = (seed * 1103515245 + 12345) % 2147483648;
      return seed % n;
    };
    const two = (v: number) => String(v).padStart(2, '0');
    for (let i = 0; i < 20_000; i++) {
      const text =
        `${String(1000 + next(9000))}-${two(1 + next(12))}-${two(1 + next(28))}T${two(next(24))}:${two(next(60))}:${two(next(60))}` +
        ['', `.${String(next(1_000_000_000)).padStart(9, '0').slice(0, 1 + next(9))}`][next(2)] +
        ['Z', `+${two(next(15))}:${two(next(60))}`, `-${two(next(15))}:${two(next(60))}`][next(3)];
      expect(parseTimestamp(text), text).toBe(Date.parse(text));
    }
  });
});

describe('JSON depth', () => {
  it('counts nested objects and arrays, not scalars', () => {
    expect(jsonDepth(5)).toBe(0);
    expect(jsonDepth(null)).toBe(0);
    expect(jsonDepth({})).toBe(1);
    expect(jsonDepth({ a: 1, b: [1, 2] })).toBe(2);
    expect(jsonDepth([{ a: [{ b: {} }] }, 1])).toBe(5);
  });

  it('stops past the limit however deep the value goes', () => {
    let deep: unknown = {};
    for (let i = 0; i < 100_000; i++) deep = [deep];
    expect(jsonDepth(deep)).toBe(10);
  });
});
