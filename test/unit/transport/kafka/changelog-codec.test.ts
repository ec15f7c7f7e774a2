import { describe, expect, it } from 'vitest';
import { applyPartCounts, BARRIER_KEY, decodeChangelog, encodeChangelog, PART_SEPARATOR } from '../../../../src/transport/kafka/changelog-codec.ts';
import type { IncomingMessage, OutgoingMessage } from '../../../../src/transport/kafka/kafka-port.ts';

const target = (generation: string) => ({ topic: 'cl', partition: 2, generation, maxValueBytes: 10 });

/** What a consumer reads back: the written messages in order, with offsets. */
function asRead(messages: readonly OutgoingMessage[], first = 0): Pick<IncomingMessage, 'key' | 'value' | 'headers' | 'offset'>[] {
  return messages.map((m, i) => ({
    key: m.key,
    value: m.value === null ? null : Buffer.from(m.value),
    headers: m.headers ?? {},
    offset: String(first + i),
  }));
}

describe('the changelog codec', () => {
  it('writes a value that fits as one record under its own key on the partition it is given', () => {
    const { messages } = encodeChangelog([{ key: 'DC-NORTH', value: 'short' }], target('7'), new Map());
    expect(messages).toHaveLength(1);
    expect(messages[0]).toMatchObject({ topic: 'cl', partition: 2, key: 'DC-NORTH' });
    expect(decodeChangelog(asRead(messages)).entries).toEqual([{ key: 'DC-NORTH', value: 'short' }]);
  });

  it('splits a value above the limit into ceil(bytes / limit) parts and joins them back byte for byte', () => {
    // 26 bytes (ÄÖÜ and ßßß are 2 bytes each in UTF-8, the other 14 characters 1) with a 10-byte limit: 3 parts
    // (10 + 10 + 6), worked out by hand. Multi-byte characters straddle parts.
    const value = 'ÄÖÜ-DC-NORTH-ßßß-123';
    expect(Buffer.byteLength(value)).toBe(26);
    const { messages, parts } = encodeChangelog([{ key: 'DC-NORTH', value }], target('7'), new Map());
    expect(messages.map((m) => m.key)).toEqual(['DC-NORTH', `DC-NORTH${PART_SEPARATOR}1`, `DC-NORTH${PART_SEPARATOR}2`]);
    expect(parts.get('DC-NORTH')).toBe(3);
    expect(decodeChangelog(asRead(messages)).entries).toEqual([{ key: 'DC-NORTH', value }]);
  });

  it('tombstones the parts a shorter value no longer needs, so compaction cannot mix two writes', () => {
    const known = new Map<string, number>();
    const first = encodeChangelog([{ key: 'K', value: 'x'.repeat(30) }], target('1'), known);
    applyPartCounts(known, first.parts);
    const second = encodeChangelog([{ key: 'K', value: 'short' }], target('2'), known);
    expect(second.messages.map((m) => [m.key, m.value === null])).toEqual([
      ['K', false],
      [`K${PART_SEPARATOR}1`, true],
      [`K${PART_SEPARATOR}2`, true],
    ]);
    expect(decodeChangelog(asRead([...first.messages, ...second.messages])).entries).toEqual([{ key: 'K', value: 'short' }]);
  });

  it('deletes a key and all its parts on a null value', () => {
    const known = new Map([['K', 2]]);
    const { messages, parts } = encodeChangelog([{ key: 'K', value: null }], target('3'), known);
    expect(messages.map((m) => [m.key, m.value])).toEqual([
      ['K', null],
      [`K${PART_SEPARATOR}1`, null],
    ]);
    applyPartCounts(known, parts);
    expect(known.has('K')).toBe(false);
  });

  it('keeps the last write of each key and ignores restore barriers', () => {
    const a = encodeChangelog([{ key: 'A', value: 'one' }], target('1'), new Map()).messages;
    const b = encodeChangelog([{ key: 'A', value: 'two' }, { key: 'B', value: 'bee' }], target('2'), new Map()).messages;
    const barrier: OutgoingMessage = { topic: 'cl', key: BARRIER_KEY, value: '{"nonce":"n"}' };
    const { entries } = decodeChangelog(asRead([...a, barrier, ...b]));
    expect(entries).toEqual([
      { key: 'A', value: 'two' },
      { key: 'B', value: 'bee' },
    ]);
  });

  it('refuses to restore a value whose parts come from different writes, naming the key', () => {
    const whole = encodeChangelog([{ key: 'K', value: 'y'.repeat(25) }], target('1'), new Map()).messages;
    const other = encodeChangelog([{ key: 'K', value: 'z'.repeat(25) }], target('2'), new Map()).messages;
    // Part 1 of the second write overwrote part 1 of the first; part 0 and 2 are still the first write's.
    expect(() => decodeChangelog(asRead([...whole, other[1]!]))).toThrow(/changelog key K .* part 1 is missing or from another write/);
  });
});
