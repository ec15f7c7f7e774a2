import { NearcastError } from '../../errors.ts';
import type { OutgoingMessage } from './kafka-port.ts';

// kafkajs puts every message of one send for one partition into a single record batch, and the broker refuses a
// batch above its message size limit. So a transaction's messages are sent in chunks whose total stays under the
// configured limit; a chunk can then never yield a batch that is too large, whichever partitions it touches.
// kafkajs also groups one send's messages by partition in time quadratic in their number per partition (each
// message copies its partition's list so far), so a chunk holds a bounded number of messages as well.

/** Bytes a record adds to its batch beyond key, value and headers (record header varints, attributes; generous). */
const RECORD_OVERHEAD = 64;
/** The record batch header (61 bytes in format v2), rounded up. */
const BATCH_OVERHEAD = 128;
/** Most messages in one chunk: grouping 50k messages for one partition costs ~200 ms in chunks of 1,800, ~60 in 500. */
export const MAX_CHUNK_MESSAGES = 500;

function byteLength(v: string | Buffer | null): number {
  if (v === null) return 0;
  return typeof v === 'string' ? Buffer.byteLength(v, 'utf8') : v.length;
}

export function messageBytes(m: OutgoingMessage): number {
  let size = RECORD_OVERHEAD + byteLength(m.key) + byteLength(m.value);
  for (const [k, v] of Object.entries(m.headers ?? {})) size += 8 + Buffer.byteLength(k) + Buffer.byteLength(v);
  return size;
}

/** Splits messages, in order, into consecutive chunks each under `maxBytes` and of at most `maxCount` messages. */
export function chunkMessages(messages: readonly OutgoingMessage[], maxBytes: number, maxCount = MAX_CHUNK_MESSAGES): OutgoingMessage[][] {
  const chunks: OutgoingMessage[][] = [];
  let current: OutgoingMessage[] = [];
  let size = BATCH_OVERHEAD;
  for (const m of messages) {
    const bytes = messageBytes(m);
    if (bytes + BATCH_OVERHEAD > maxBytes) {
      throw new NearcastError('NEARCAST_KAFKA_MESSAGE_TOO_LARGE', [
        `a message for ${m.topic} with key ${m.key} takes ${bytes} bytes, above the limit of ${maxBytes - BATCH_OVERHEAD} (kafka.maxMessageBytes)`,
      ]);
    }
    if ((size + bytes > maxBytes || current.length >= maxCount) && current.length > 0) {
      chunks.push(current);
      current = [];
      size = BATCH_OVERHEAD;
    }
    current.push(m);
    size += bytes;
  }
  if (current.length > 0) chunks.push(current);
  return chunks;
}

/** Largest value one record may carry so that key, headers and overheads still fit under `maxBytes`. */
export function maxValueBytes(maxBytes: number): number {
  return maxBytes - BATCH_OVERHEAD - RECORD_OVERHEAD - 1_024;
}
