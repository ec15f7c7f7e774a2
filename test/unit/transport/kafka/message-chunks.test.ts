import { describe, expect, it } from 'vitest';
import { isNearcastError } from '../../../../src/errors.ts';
import { chunkMessages, messageBytes } from '../../../../src/transport/kafka/message-chunks.ts';

const msg = (key: string, bytes: number) => ({ topic: 'plans', key, value: 'v'.repeat(bytes) });

describe('transaction chunking', () => {
  it('keeps every chunk under the limit and the messages in their order', () => {
    const messages = Array.from({ length: 50 }, (_, i) => msg(`DC-NORTH|ITEM-${i}`, 900));
    const chunks = chunkMessages(messages, 10_000);
    expect(chunks.flat()).toEqual(messages);
    // 50 × (64 + 14..15 + 900) ≈ 49 KB; at most ~10 per 10 000-byte chunk (128-byte batch header) → at least 5 chunks.
    expect(chunks.length).toBeGreaterThanOrEqual(5);
    for (const c of chunks) expect(128 + c.reduce((s, m) => s + messageBytes(m), 0)).toBeLessThanOrEqual(10_000);
  });

  it('puts at most the given number of small messages in one chunk, in order', () => {
    const messages = Array.from({ length: 1_201 }, (_, i) => msg(`DC-NORTH|ITEM-${i}`, 10));
    const chunks = chunkMessages(messages, 900_000, 500);
    expect(chunks.map((c) => c.length)).toEqual([500, 500, 201]);
    expect(chunks.flat()).toEqual(messages);
  });

  it('counts key, value and header bytes of a message', () => {
    // 64 overhead + 3 key + 5 value + (8 + 5 + 3) header, worked out by hand.
    expect(messageBytes({ topic: 't', key: 'abc', value: 'hello', headers: { ce_id: 'xyz' } })).toBe(88);
  });

  it('refuses a single message above the limit with a clear error instead of letting the broker refuse the batch', () => {
    try {
      chunkMessages([msg('DC-NORTH|BIG', 20_000)], 10_000);
      expect.unreachable();
    } catch (err) {
      expect(isNearcastError(err, 'NEARCAST_KAFKA_MESSAGE_TOO_LARGE')).toBe(true);
      expect((err as Error).message).toMatch(/key DC-NORTH\|BIG takes 20076 bytes/);
    }
  });

  it('returns no chunk for no messages', () => {
    expect(chunkMessages([], 10_000)).toEqual([]);
  });
});
