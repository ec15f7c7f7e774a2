import type { BaselineVersion } from '../contracts/baseline-version.ts';
import type { DayClosed } from '../contracts/day-closed.ts';
import type { Location } from '../contracts/location.ts';
import type { OrderLine } from '../contracts/order-line.ts';
import type { InputType } from '../contracts/records.ts';
import type { Shipment } from '../contracts/shipment.ts';
import { utf8Text } from '../contracts/utf8-text.ts';
import type { AlertCommand, DeadlineClose, FeedHealthCheck } from './internal-records.ts';

// The envelope of one record in the internal event log (Kafka topic nearcast.internal.events.v1, or the SQLite
// `event_log` table). Keyed and partitioned by `location`; the log's order per location is the total order the
// sensing stage applies, so a replay of the log gives byte-identical outputs.

export const INTERNAL_KINDS = ['deadline-close', 'feed-health-check', 'alert-command'] as const;
export type InternalKind = (typeof INTERNAL_KINDS)[number];
export type EventKind = InputType | InternalKind;

/** Where a record came from, kept for dead letters, explanations and audits. */
export type EventSource =
  | { readonly kind: 'topic'; readonly topic: string; readonly partition: number; readonly offset: string }
  | { readonly kind: 'file'; readonly file: string; readonly line: number }
  | { readonly kind: 'http'; readonly route: string; readonly requestId: string; readonly index: number }
  | { readonly kind: 'internal'; readonly origin: 'deadline-clock' | 'feed-health-clock' | 'api' | 'cli' };

export interface PayloadByKind {
  'order-line': OrderLine;
  shipment: Shipment;
  'baseline-version': BaselineVersion;
  'day-closed': DayClosed;
  location: Location;
  'deadline-close': DeadlineClose;
  'feed-health-check': FeedHealthCheck;
  'alert-command': AlertCommand;
}

export interface EventLogRecordOf<K extends EventKind> {
  /** Envelope version. */
  readonly v: 1;
  readonly kind: K;
  /** Partition key. */
  readonly location: string;
  /** When the fact became known (changedAt ?? orderedAt, shippedAt, publishedAt; arrival for the rest), epoch ms. */
  readonly knowledgeMs: number;
  /**
   * When the record reached nearcast, epoch ms: the broker timestamp of the input message, the HTTP receipt time,
   * or in a file replay DESIGN section 3's arrival rule. Caps the event-time watermark (arrival + skew).
   */
  readonly arrivalMs: number;
  readonly source: EventSource;
  /** The validated record. */
  readonly record: PayloadByKind[K];
}

export type EventLogRecord = { [K in EventKind]: EventLogRecordOf<K> }[EventKind];

/** A record as read back from one event-log partition, with its position in that partition. */
export interface LogEntry {
  /** Decimal offset in the partition (Kafka offset, SQLite sequence); strictly increasing per partition. */
  readonly offset: string;
  readonly record: EventLogRecord;
}

export function encodeEventLogRecord(record: EventLogRecord): string {
  return JSON.stringify(record);
}

export function decodeEventLogRecord(text: string | Uint8Array): EventLogRecord {
  const value = JSON.parse(utf8Text(text)) as EventLogRecord;
  if (value === null || typeof value !== 'object' || value.v !== 1 || typeof value.kind !== 'string') {
    throw new TypeError('not a nearcast event-log record (v1)');
  }
  return value;
}

/**
 * Event time that may advance a location's watermark: orderedAt / changedAt / shippedAt only — never requested
 * dates, baselines or master data. Undefined for kinds that do not advance it.
 */
export function eventTimeMs(record: EventLogRecord): number | undefined {
  switch (record.kind) {
    case 'order-line':
    case 'shipment':
      return record.knowledgeMs;
    default:
      return undefined;
  }
}
