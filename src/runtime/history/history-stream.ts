import type { Location } from '../../contracts/location.ts';
import { DEFAULT_INPUT_LIMITS } from '../../contracts/primitives.ts';
import type { RecordValidator } from '../../contracts/validate.ts';
import type { ErrorCode } from '../../errors.ts';
import { clockRecordsDue, startCursor, type ClockCursor } from '../clock-records.ts';
import type { EventLogRecord } from '../event-log-record.ts';
import { ingest } from '../ingest-stage.ts';
import { addDays, startOfLocalDayMs } from '../local-day.ts';
import type { StageSettings } from '../stage-settings.ts';
import { mergeByArrival, withArrival } from './arrival-merge.ts';
import { findHistoryFiles, readHistoryFile, type FoundFile } from './history-files.ts';
import { readLocationsFile } from './locations-file.ts';

// A history folder as one event-log stream, in the order a live run would have logged it: master data first, then
// the files merged by arrival (DESIGN section 3), with the deadline closes and feed-health checks the replay clock
// makes due written in between — the replay clock being the arrival time of the stream itself, never the wall clock.

export interface Rejection {
  readonly file: string;
  readonly line: number;
  readonly code: ErrorCode;
  readonly reason: string;
  readonly issues: readonly { readonly path: string; readonly message: string }[];
  /** Input type the file holds, and the line's text (for quarantine and replay). */
  readonly type: string;
  readonly raw: string;
}

export interface HistoryStreamOptions {
  readonly validator: RecordValidator;
  readonly settings: Pick<StageSettings, 'feedStallAfterMs' | 'defaultDayCloseDeadline'>;
  readonly onRejected: (rejection: Rejection) => void;
  /** Shipments required (demand basis `shipments`). */
  readonly requireShipments?: boolean;
  /**
   * The instant the history ends ("now" of the replay): the replay clock runs on to it after the last record, so
   * the deadlines that passed by then close their days. Without it the clock stops at the last record.
   */
  readonly clockUntilMs?: number;
}

/** Master data is known before any fact of the history: it is logged at the earliest accepted instant. */
export const MASTER_ARRIVAL_MS = Date.parse(DEFAULT_INPUT_LIMITS.earliestTimestamp);

type Validated = { record: EventLogRecord; knowledgeMs: number };

async function* validatedLines(file: FoundFile, options: HistoryStreamOptions, locations: ReadonlyMap<string, Location>): AsyncGenerator<{ item: Validated; line: number }> {
  for await (const raw of readHistoryFile(file)) {
    if ('problem' in raw) {
      options.onRejected({ file: raw.file, line: raw.line, code: 'NEARCAST_INPUT_INVALID', reason: raw.problem, issues: [{ path: '', message: raw.problem }], type: file.type, raw: '' });
      continue;
    }
    const result = ingest({ type: file.type, value: raw.text, source: { kind: 'file', file: raw.file, line: raw.line }, arrivalMs: 0 }, options.validator);
    if (!result.ok) {
      const dl = result.deadLetter;
      options.onRejected({ file: raw.file, line: raw.line, code: dl.code, reason: dl.reason, issues: dl.issues, type: file.type, raw: raw.text });
      continue;
    }
    let record = result.record;
    if (record.kind === 'day-closed') {
      // A day-closed record carries no time: it is known once its day has ended locally.
      const tz = locations.get(record.location)?.timeZone ?? 'UTC';
      record = { ...record, knowledgeMs: startOfLocalDayMs(addDays(record.record.date, 1), tz) };
    }
    yield { item: { record, knowledgeMs: record.knowledgeMs }, line: raw.line };
  }
}

export async function* historyStream(dir: string, options: HistoryStreamOptions): AsyncGenerator<EventLogRecord> {
  // Every missing file is named at once, before anything is read.
  const files = findHistoryFiles(dir, { requireShipments: options.requireShipments });
  const locations = new Map<string, Location>();
  for (const raw of readLocationsFile(dir)) {
    if ('problem' in raw) {
      options.onRejected({ file: raw.file, line: raw.line, code: 'NEARCAST_INPUT_MALFORMED_JSON', reason: raw.problem, issues: [{ path: '', message: raw.problem }], type: 'location', raw: '' });
      continue;
    }
    const result = ingest({ type: 'location', value: raw.text, source: { kind: 'file', file: raw.file, line: raw.line }, arrivalMs: MASTER_ARRIVAL_MS }, options.validator);
    if (!result.ok) {
      const dl = result.deadLetter;
      options.onRejected({ file: raw.file, line: raw.line, code: dl.code, reason: dl.reason, issues: dl.issues, type: 'location', raw: raw.text });
      continue;
    }
    if (result.record.kind === 'location') locations.set(result.record.location, result.record.record);
    yield result.record;
  }

  const merged = mergeByArrival(files.map((f, rank) => withArrival(validatedLines(f, options, locations), rank)));
  const cursors = new Map<string, ClockCursor>();
  for await (const { item, arrivalMs } of merged) {
    for (const due of clockRecordsDue(arrivalMs, locations, cursors, options.settings)) yield due;
    const record = { ...item.record, arrivalMs } as EventLogRecord;
    yield record;
    const location = locations.get(record.location);
    if (location && !cursors.has(record.location) && (record.kind === 'order-line' || record.kind === 'shipment')) {
      cursors.set(record.location, startCursor(location, arrivalMs, options.settings));
    }
  }
  if (options.clockUntilMs !== undefined) {
    for (const due of clockRecordsDue(options.clockUntilMs, locations, cursors, options.settings)) yield due;
  }
}
