import type { CloudEvent } from '../contracts/cloudevents.ts';
import type { AccuracySummary } from '../contracts/accuracy-summary.ts';
import type { Alert } from '../contracts/alert.ts';
import type { Manifest } from '../contracts/manifest.ts';
import type { Plan } from '../contracts/plan.ts';
import type { ReplanEntry } from '../contracts/replan-entry.ts';
import type { DeadLetterRecord } from './dead-letter.ts';

// What one applied batch of the sensing stage produces. A transport writes all of it in one transaction (Kafka:
// one producer transaction with the consumed offsets; SQLite: one database transaction), then calls commit().

/** Logical output topic; the transport maps it to the configured name (src/config/topics.ts keys). */
export type OutputTopic = 'plans' | 'alerts' | 'accuracy' | 'deadLetter';

export type OutputData = Plan | Manifest | Alert | ReplanEntry | AccuracySummary | DeadLetterRecord;

export interface OutputRecord {
  readonly topic: OutputTopic;
  /** Compaction key: plans `location|item`, manifest `location|#manifest`, alerts `location|item|rule|episodeStart`. */
  readonly key: string;
  /** Partition key (always the location, or null for a dead letter that names none). */
  readonly location: string | null;
  /** CloudEvents envelope with a deterministic id; over Kafka in binary mode (toKafkaBinary). */
  readonly event: CloudEvent<OutputData>;
}

/**
 * One entry of the state changelog (Kafka topic nearcast.internal.changelog.v1, compacted; written to the changelog
 * partition with the same number as the event-log partition; SQLite table `state`). Later entries for a key replace
 * earlier ones; `value: null` deletes the key.
 * Keys: a location id → that location's full state snapshot (JSON); `#partition` → the partition's own state,
 * which holds the applied offset (the next event-log offset to apply).
 */
export interface ChangelogEntry {
  readonly key: string;
  readonly value: string | null;
}

export const PARTITION_STATE_KEY = '#partition';

export interface BatchResult {
  /** In publication order: per closing location its plans (key order), then its manifest, then its alerts. */
  readonly outputs: readonly OutputRecord[];
  readonly changelog: readonly ChangelogEntry[];
  /** The next event-log offset to apply once this batch commits (also inside the `#partition` changelog entry). */
  readonly nextOffset: string;
  /** Days closed in this batch, for progress and metrics. */
  readonly closes: readonly { readonly location: string; readonly planDate: string; readonly revision: number; readonly series: number }[];
}
