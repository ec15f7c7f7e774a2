import { INPUT_TYPES, type InputType } from '../contracts/records.ts';
import { utf8Text } from '../contracts/utf8-text.ts';
import { jsonDepth, MAX_JSON_DEPTH, MAX_RECORD_BYTES, type RecordValidator } from '../contracts/validate.ts';
import { deadLetter, type DeadLetterRecord } from './dead-letter.ts';
import type { EventKind, EventLogRecord, EventSource } from './event-log-record.ts';
import { alertCommandSchema, deadlineCloseSchema, feedHealthCheckSchema } from './internal-records.ts';
import { knowledgeTimeMs } from './knowledge-time.ts';

// The ingest stage is a pure function: raw bytes in, one event-log record or one dead letter out. It is stateless
// (it cannot know master data); an unknown location is caught by the sensing stage, which owns the location state.

export interface RawInput {
  /** Input type the source carries (from the topic, file or route), or an internal kind. */
  readonly type: string;
  readonly value: string | Uint8Array;
  readonly source: EventSource;
  readonly arrivalMs: number;
}

export type IngestResult =
  | { readonly ok: true; readonly record: EventLogRecord }
  | { readonly ok: false; readonly deadLetter: DeadLetterRecord };

const INTERNAL_SCHEMAS = {
  'deadline-close': deadlineCloseSchema,
  'feed-health-check': feedHealthCheckSchema,
  'alert-command': alertCommandSchema,
} as const;

function isInputType(type: string): type is InputType {
  return (INPUT_TYPES as readonly string[]).includes(type);
}

type RefusalCode = Parameters<typeof deadLetter>[0]['code'];

/** A plain function, not a closure made in ingest(): one per record was a measurable part of a large batch's ingest. */
function refused(raw: RawInput, text: string, code: RefusalCode, issues: { path: string; message: string }[], location: string | null = null): IngestResult {
  return { ok: false, deadLetter: deadLetter({ type: raw.type, code, issues, stage: 'ingest', source: raw.source, location, arrivalMs: raw.arrivalMs, raw: text }) };
}

export function ingest(raw: RawInput, validator: RecordValidator): IngestResult {
  const text = utf8Text(raw.value);

  if (isInputType(raw.type)) {
    const checked = validator.parse(raw.type, text);
    if (!checked.ok) return refused(raw, text, checked.code, [...checked.issues], locationOf(text));
    const record = checked.value as { location: string };
    return {
      ok: true,
      record: {
        v: 1,
        kind: raw.type,
        location: record.location,
        knowledgeMs: knowledgeTimeMs(raw.type, checked.value, raw.arrivalMs),
        arrivalMs: raw.arrivalMs,
        source: raw.source,
        record: checked.value,
      } as EventLogRecord,
    };
  }

  if (raw.type in INTERNAL_SCHEMAS) {
    const kind = raw.type as keyof typeof INTERNAL_SCHEMAS;
    if (Buffer.byteLength(text, 'utf8') > MAX_RECORD_BYTES) return refused(raw, text, 'NEARCAST_INPUT_TOO_LARGE', [{ path: '', message: `is larger than ${MAX_RECORD_BYTES} bytes` }]);
    let value: unknown;
    try {
      value = JSON.parse(text);
    } catch {
      return refused(raw, text, 'NEARCAST_INPUT_MALFORMED_JSON', [{ path: '', message: 'is not valid JSON' }]);
    }
    if (jsonDepth(value) > MAX_JSON_DEPTH) return refused(raw, text, 'NEARCAST_INPUT_TOO_DEEP', [{ path: '', message: `nests deeper than ${MAX_JSON_DEPTH} levels` }]);
    const parsed = INTERNAL_SCHEMAS[kind].safeParse(value);
    if (!parsed.success) {
      return refused(
        raw,
        text,
        'NEARCAST_INPUT_INVALID',
        parsed.error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message })),
        locationOf(text),
      );
    }
    const data = parsed.data as { location: string; atMs?: number; deadlineMs?: number };
    return {
      ok: true,
      record: {
        v: 1,
        kind: kind as EventKind,
        location: data.location,
        knowledgeMs: data.atMs ?? data.deadlineMs ?? raw.arrivalMs,
        arrivalMs: raw.arrivalMs,
        source: raw.source,
        record: parsed.data,
      } as EventLogRecord,
    };
  }

  return refused(raw, text, 'NEARCAST_INPUT_UNKNOWN_TYPE', [{ path: '', message: `type must be one of ${[...INPUT_TYPES, ...Object.keys(INTERNAL_SCHEMAS)].join(', ')}` }]);
}

/** Best-effort location of a refused record, so dead letters can be listed per location; never trusted further. */
function locationOf(text: string): string | null {
  try {
    const v = JSON.parse(text) as { location?: unknown };
    return typeof v?.location === 'string' && /^[A-Za-z0-9][A-Za-z0-9._:-]{0,63}$/.test(v.location) ? v.location : null;
  } catch {
    return null;
  }
}
