import type { RecordValidator } from '../../contracts/validate.ts';
import type { DeadLetterRecord } from '../../runtime/dead-letter.ts';
import type { EventLogRecord } from '../../runtime/event-log-record.ts';
import { ingest } from '../../runtime/ingest-stage.ts';
import type { EmbeddedRuntime } from './embedded-runtime.ts';
import type { LiveClock } from './live-clock.ts';

/** Input types the HTTP route accepts: the five inputs and planners' alert commands (clock records are internal). */
export const HTTP_TYPES = ['order-line', 'shipment', 'baseline-version', 'day-closed', 'location', 'alert-command'] as const;

export interface IngestReport {
  readonly accepted: number;
  readonly rejected: readonly { readonly index: number; readonly code: string; readonly reason: string; readonly issues: DeadLetterRecord['issues'] }[];
}

/** Splits a request body into records: one JSON object, a JSON array, or NDJSON text (blank lines ignored). */
export function bodyRecords(body: unknown): string[] {
  if (typeof body === 'string') return body.split(/\r?\n/).filter((l) => l.trim() !== '');
  if (Array.isArray(body)) return body.map((v) => JSON.stringify(v));
  return [JSON.stringify(body)];
}

/** Validates, logs and applies one HTTP batch in the embedded runtime; refused records become dead letters. */
export function ingestHttpBatch(
  runtime: EmbeddedRuntime,
  validator: RecordValidator,
  clock: LiveClock | undefined,
  args: { type: string; texts: readonly string[]; requestId: string; route: string; arrivalMs: number },
): IngestReport {
  const good: EventLogRecord[] = [];
  const dead: DeadLetterRecord[] = [];
  const rejected: IngestReport['rejected'][number][] = [];
  args.texts.forEach((text, index) => {
    const result = ingest({ type: args.type, value: text, source: { kind: 'http', route: args.route, requestId: args.requestId, index }, arrivalMs: args.arrivalMs }, validator);
    if (result.ok) good.push(result.record);
    else {
      dead.push(result.deadLetter);
      rejected.push({ index, code: result.deadLetter.code, reason: result.deadLetter.reason, issues: result.deadLetter.issues });
    }
  });
  runtime.append(good, dead);
  clock?.noteFacts(good);
  runtime.pump();
  return { accepted: good.length, rejected };
}
