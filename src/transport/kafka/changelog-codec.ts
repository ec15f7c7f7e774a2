import { NearcastError } from '../../errors.ts';
import type { ChangelogEntry } from '../../runtime/stage-output.ts';
import type { Headers, IncomingMessage, OutgoingMessage } from './kafka-port.ts';

// State changelog entries as Kafka records on a compacted topic. A value above the message size limit (a large
// location's snapshot) is split into parts: part 0 under the entry's own key, part i under `key␟i`, all tagged with
// the batch that wrote them. Parts a shorter value no longer needs are tombstoned in the same transaction, so after
// compaction the newest parts of a key always belong to one write. `#barrier` records mark the end of a restore.

export const PART_SEPARATOR = '\u001f';
export const BARRIER_KEY = '#barrier';
const H_PARTS = 'nc-parts';
const H_PART = 'nc-part';
const H_GEN = 'nc-gen';

/** How many records each key's current value occupies (1 = unsplit); kept per partition, rebuilt on restore. */
export type PartCounts = Map<string, number>;

export interface EncodedChangelog {
  readonly messages: OutgoingMessage[];
  /** Part counts after this write; apply to the partition's PartCounts only once the transaction committed. */
  readonly parts: ReadonlyMap<string, number>;
}

function partKey(key: string, i: number): string {
  return i === 0 ? key : `${key}${PART_SEPARATOR}${i}`;
}

export function encodeChangelog(
  entries: readonly ChangelogEntry[],
  target: { topic: string; partition: number; generation: string; maxValueBytes: number },
  known: ReadonlyMap<string, number>,
): EncodedChangelog {
  const messages: OutgoingMessage[] = [];
  const parts = new Map<string, number>();
  const msg = (key: string, value: Buffer | null, headers?: Headers): OutgoingMessage => ({
    topic: target.topic,
    partition: target.partition,
    key,
    value,
    ...(headers ? { headers } : {}),
  });
  for (const { key, value } of entries) {
    if (key.includes(PART_SEPARATOR)) throw new TypeError(`changelog key ${JSON.stringify(key)} contains the part separator`);
    const before = parts.get(key) ?? known.get(key) ?? 1;
    let now = 0;
    if (value !== null) {
      const bytes = Buffer.from(value, 'utf8');
      now = Math.max(1, Math.ceil(bytes.length / target.maxValueBytes));
      for (let i = 0; i < now; i++) {
        const slice = bytes.subarray(i * target.maxValueBytes, (i + 1) * target.maxValueBytes);
        messages.push(msg(partKey(key, i), slice, i === 0 ? { [H_PARTS]: String(now), [H_GEN]: target.generation } : { [H_PART]: String(i), [H_GEN]: target.generation }));
      }
    }
    for (let i = now; i < before; i++) messages.push(msg(partKey(key, i), null));
    parts.set(key, now);
  }
  return { messages, parts };
}

/** Applies a committed write's part counts (0 = deleted). */
export function applyPartCounts(known: PartCounts, written: ReadonlyMap<string, number>): void {
  for (const [k, n] of written) {
    if (n === 0) known.delete(k);
    else known.set(k, n);
  }
}

export interface DecodedChangelog {
  readonly entries: ChangelogEntry[];
  readonly parts: PartCounts;
}

/** Rebuilds the entries from one changelog partition's records read in log order: last record per key wins. */
export function decodeChangelog(records: Iterable<Pick<IncomingMessage, 'key' | 'value' | 'headers' | 'offset'>>): DecodedChangelog {
  const last = new Map<string, Pick<IncomingMessage, 'value' | 'headers' | 'offset'>>();
  for (const r of records) {
    if (r.key === null) continue;
    last.set(r.key, r);
  }
  const entries: ChangelogEntry[] = [];
  const parts: PartCounts = new Map();
  for (const [key, head] of last) {
    if (key.includes(PART_SEPARATOR) || key === BARRIER_KEY || head.value === null) continue;
    const n = Number(head.headers[H_PARTS] ?? '1');
    const gen = head.headers[H_GEN];
    const buffers: Buffer[] = [head.value];
    for (let i = 1; i < n; i++) {
      const part = last.get(partKey(key, i));
      if (!part?.value || part.headers[H_GEN] !== gen || part.headers[H_PART] !== String(i)) {
        throw new NearcastError('NEARCAST_STATE_CORRUPT', [
          `changelog key ${key} (offset ${head.offset}) has ${n} parts written by ${gen ?? 'an unknown batch'} but part ${i} is missing or from another write`,
        ]);
      }
      buffers.push(part.value);
    }
    entries.push({ key, value: Buffer.concat(buffers).toString('utf8') });
    parts.set(key, n);
  }
  return { entries, parts };
}
