import path from 'node:path';
import type { RecordValidator } from '../../contracts/validate.ts';
import { deadLetter, type DeadLetterRecord } from '../../runtime/dead-letter.ts';
import type { EventLogRecord } from '../../runtime/event-log-record.ts';
import { historyStream, MASTER_ARRIVAL_MS, type Rejection } from '../../runtime/history/history-stream.ts';
import type { EmbeddedRuntime } from './embedded-runtime.ts';

// Feeds a history folder into the embedded runtime. The stream is deterministic, so its position is simply how
// many log records of it were appended; that count is committed with each appended batch. After a crash the
// stream is regenerated, the committed prefix skipped, and the run goes on exactly where it stopped.

export interface FeedOptions {
  readonly validator: RecordValidator;
  readonly batchSize?: number;
  /** Apply each appended batch right away (keeps the log and the state close together). */
  readonly pumpEvery?: boolean;
  readonly progress?: (line: string) => void;
  readonly progressEvery?: number;
  /** End of the history: the replay clock runs on to it (see historyStream). */
  readonly untilMs?: number;
}

export interface FeedResult {
  readonly appended: number;
  readonly skipped: number;
  readonly rejected: number;
}

function rejectionToDeadLetter(r: Rejection): DeadLetterRecord {
  return deadLetter({
    type: r.type,
    code: r.code,
    issues: r.issues,
    stage: 'ingest',
    source: { kind: 'file', file: r.file, line: r.line },
    location: null,
    arrivalMs: MASTER_ARRIVAL_MS,
    raw: r.raw,
  });
}

export async function feedHistory(runtime: EmbeddedRuntime, dir: string, options: FeedOptions): Promise<FeedResult> {
  const name = `history:${path.resolve(dir)}`;
  const done = Number(runtime.store.getPosition(name) ?? '0');
  const batchSize = options.batchSize ?? 2_000;
  const progressEvery = options.progressEvery ?? 100_000;
  let seen = 0;
  let appended = 0;
  let rejected = 0;
  let records: EventLogRecord[] = [];
  let dead: DeadLetterRecord[] = [];
  const flush = () => {
    if (records.length === 0 && dead.length === 0) return;
    runtime.append(records, dead, { name, value: String(seen) });
    appended += records.length;
    records = [];
    dead = [];
    if (options.pumpEvery !== false) runtime.pump();
  };
  const stream = historyStream(dir, {
    validator: options.validator,
    settings: runtime.settings,
    requireShipments: runtime.settings.demandBasis === 'shipments',
    clockUntilMs: options.untilMs,
    onRejected: (r) => {
      rejected++;
      if (seen < done) return; // committed with the prefix before a restart
      dead.push(rejectionToDeadLetter(r));
    },
  });
  for await (const record of stream) {
    seen++;
    if (seen <= done) continue;
    records.push(record);
    if (records.length >= batchSize) flush();
    if (options.progress && seen % progressEvery === 0) options.progress(`feed: ${seen} records logged`);
  }
  flush();
  runtime.pump();
  return { appended, skipped: Math.min(done, seen), rejected };
}
