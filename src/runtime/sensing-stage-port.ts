import type { LogEntry } from './event-log-record.ts';
import type { BatchResult, ChangelogEntry } from './stage-output.ts';

/**
 * The stateful sensing stage of one event-log partition, independent of the transport.
 *
 * Protocol a transport follows (Kafka and SQLite alike):
 *  1. on assignment: `restore(changelog entries of this partition)`, then read the log from `nextOffset()`;
 *  2. `apply(batch)`: applies the entries to an overlay of the state and returns outputs + changelog + next offset.
 *     Entries below `nextOffset()` are skipped (a re-delivered batch changes nothing);
 *  3. write outputs, changelog and the consumed offset in ONE transaction; then `commit()` (overlay becomes the
 *     state) — or on any error `abort()`: the partition's state is dropped (DESIGN section 6) and the transport
 *     calls `restore(changelog)` again before the next `apply` (which refuses until then).
 * Only one batch may be open at a time. Never reads the clock: every time comes from the records.
 */
export interface SensingStage {
  readonly partition: number;
  /** Next event-log offset to apply (the applied offset kept inside the state); '0' when nothing was applied. */
  nextOffset(): string;
  apply(batch: readonly LogEntry[]): BatchResult;
  commit(): void;
  /** Drops the partition's state after a failed transaction; restore() must follow. */
  abort(): void;
  /** Rebuilds the whole partition state from its changelog (replaces whatever the stage held). */
  restore(entries: Iterable<ChangelogEntry>): void;
  /** Locations this partition holds state for. */
  locations(): readonly string[];
}
