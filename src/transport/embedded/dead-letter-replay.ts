import type { RecordValidator } from '../../contracts/validate.ts';
import { ERRORS, type ErrorCode } from '../../errors.ts';
import type { EventLogRecord } from '../../runtime/event-log-record.ts';
import { ingest } from '../../runtime/ingest-stage.ts';
import type { EmbeddedRuntime } from './embedded-runtime.ts';

export interface ReplayReport {
  readonly replayed: number;
  /** Accepted by ingest and appended to the event log. */
  readonly accepted: number;
  /** Refused by ingest again (they stay quarantined as they were). */
  readonly stillRefused: number;
  /** Appended, but the sensing stage quarantined them again (e.g. the location is still unknown). */
  readonly stillDead: number;
}

/**
 * Replays quarantined records once their cause is fixed: each goes through the ingest stage again with its original
 * source (so a renewed refusal lands on the same dead-letter key) and, if accepted, into the event log; its dead
 * letter is removed in the same transaction. By default only retriable codes are replayed.
 */
export function replayDeadLetters(runtime: EmbeddedRuntime, validator: RecordValidator, options: { location?: string; code?: string; arrivalMs: number }): ReplayReport {
  const store = runtime.store;
  const candidates = store
    .deadLetters({ ...(options.location ? { location: options.location } : {}), ...(options.code ? { code: options.code } : {}) })
    .filter((d) => options.code !== undefined || ERRORS[d.record.code as ErrorCode]?.retriable);
  const accepted: { key: string; record: EventLogRecord }[] = [];
  let stillRefused = 0;
  for (const d of candidates) {
    if (d.record.rawTruncated) {
      stillRefused++;
      continue;
    }
    const result = ingest({ type: d.record.type, value: d.record.raw, source: d.record.source, arrivalMs: options.arrivalMs }, validator);
    if (result.ok) accepted.push({ key: d.key, record: result.record });
    else stillRefused++;
  }
  store.transaction(() => {
    for (const a of accepted) store.deleteDeadLetter(a.key);
    runtime.append(accepted.map((a) => a.record));
  });
  runtime.pump();
  const present = new Set(store.deadLetters().map((d) => d.key));
  const stillDead = accepted.filter((a) => present.has(a.key)).length;
  return { replayed: candidates.length, accepted: accepted.length - stillDead, stillRefused, stillDead };
}
