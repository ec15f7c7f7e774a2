import type { Issue } from '../contracts/validate.ts';
import { ERRORS, type ErrorCode } from '../errors.ts';
import type { EventSource } from './event-log-record.ts';

export const DEAD_LETTER_SCHEMA_VERSION = 'nearcast.dead-letter.v1';

// A quarantined input: why (stable code + field paths in a planner's words), where it came from, and the original
// text so it can be replayed once the cause (typically unknown master data) is fixed.

export interface DeadLetterRecord {
  readonly schemaVersion: typeof DEAD_LETTER_SCHEMA_VERSION;
  /** The input type the record was read as (topic, file or route), or 'unknown'. */
  readonly type: string;
  readonly code: ErrorCode;
  /** One readable line: the registry message plus each issue. */
  readonly reason: string;
  readonly issues: readonly Issue[];
  readonly retriable: boolean;
  /** Which stage refused it: ingest (contract) or sensing (unknown location, too late, misaligned week...). */
  readonly stage: 'ingest' | 'sensing';
  readonly source: EventSource;
  readonly location: string | null;
  readonly arrivalMs: number;
  /** Original text, cut at MAX_RAW_CHARS (a cut record cannot be replayed and says so). */
  readonly raw: string;
  readonly rawTruncated: boolean;
}

export const MAX_RAW_CHARS = 262_144;

export function deadLetter(args: {
  type: string;
  code: ErrorCode;
  issues: readonly Issue[];
  stage: 'ingest' | 'sensing';
  source: EventSource;
  location: string | null;
  arrivalMs: number;
  raw: string;
}): DeadLetterRecord {
  const detail = args.issues.map((i) => (i.path ? `${i.path}: ${i.message}` : i.message)).join('; ');
  const truncated = args.raw.length > MAX_RAW_CHARS;
  return {
    schemaVersion: DEAD_LETTER_SCHEMA_VERSION,
    type: args.type,
    code: args.code,
    reason: detail ? `${ERRORS[args.code].message}: ${detail}` : ERRORS[args.code].message,
    issues: args.issues,
    retriable: ERRORS[args.code].retriable,
    stage: args.stage,
    source: args.source,
    location: args.location,
    arrivalMs: args.arrivalMs,
    raw: truncated ? args.raw.slice(0, MAX_RAW_CHARS) : args.raw,
    rawTruncated: truncated,
  };
}

/** Kafka key / SQLite key of a dead letter: where it came from, so a re-read of the same input overwrites it. */
export function deadLetterKey(source: EventSource): string {
  switch (source.kind) {
    case 'topic':
      return `${source.topic}|${source.partition}|${source.offset}`;
    case 'file':
      return `${source.file}|${source.line}`;
    case 'http':
      return `${source.route}|${source.requestId}|${source.index}`;
    case 'internal':
      return `internal|${source.origin}`;
  }
}
