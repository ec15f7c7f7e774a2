import type { Location } from '../../contracts/location.ts';
import { cutAfterCloses } from '../../runtime/batch-cuts.ts';
import { deadLetterKey, type DeadLetterRecord } from '../../runtime/dead-letter.ts';
import type { EventLogRecord } from '../../runtime/event-log-record.ts';
import type { LocationModelFactory } from '../../runtime/location-model-port.ts';
import { createSensingStage } from '../../runtime/sensing-stage.ts';
import type { SensingStage } from '../../runtime/sensing-stage-port.ts';
import { DEFAULT_STAGE_SETTINGS, type StageSettings } from '../../runtime/stage-settings.ts';
import type { BatchResult } from '../../runtime/stage-output.ts';
import type { EmbeddedStore } from './embedded-store.ts';

/** Named places where the crash tests kill the process (each inside or right after a transaction). */
export type FaultPoint = 'log-appended' | 'outputs-written' | 'changelog-written' | 'committed' | 'restoring';

export interface EmbeddedRuntimeOptions {
  readonly store: EmbeddedStore;
  readonly models: LocationModelFactory;
  readonly settings?: Partial<StageSettings>;
  /** Event-log records per sensing transaction. */
  readonly batchSize?: number;
  /** Test hook: called at each fault point (a crash test kills the process there). */
  readonly fault?: (point: FaultPoint) => void;
  readonly onBatch?: (partition: number, result: BatchResult) => void;
}

export interface Position {
  readonly name: string;
  readonly value: string;
}

const MASTER_PREFIX = 'master:';

/**
 * The two stages over one SQLite file. Ingest: validated records are appended to the event log (partitioned by our
 * partitioner) together with the feed position they came from, in one transaction. Sensing: per partition, read
 * from the applied offset, apply, then write outputs + changelog (which holds the offset) in one transaction and
 * only then merge the overlay. A crash anywhere leaves the file at the last commit; restart restores and goes on.
 */
export class EmbeddedRuntime {
  readonly store: EmbeddedStore;
  readonly settings: StageSettings;
  private readonly stages: SensingStage[];
  private readonly batchSize: number;
  private readonly fault: (point: FaultPoint) => void;
  private readonly onBatch?: (partition: number, result: BatchResult) => void;

  constructor(options: EmbeddedRuntimeOptions) {
    this.store = options.store;
    this.settings = { ...DEFAULT_STAGE_SETTINGS, ...options.settings, changelog: true };
    this.batchSize = options.batchSize ?? 1_000;
    this.fault = options.fault ?? (() => {});
    this.onBatch = options.onBatch;
    this.stages = Array.from({ length: this.store.partitions }, (_, partition) => {
      const stage = createSensingStage({ partition, models: options.models, settings: this.settings });
      this.fault('restoring');
      stage.restore(this.store.changelog(partition));
      return stage;
    });
  }

  /** Appends records (and dead letters of refused input) in one transaction, with the feed's new position. */
  append(records: readonly EventLogRecord[], deadLetters: readonly DeadLetterRecord[] = [], position?: Position): void {
    this.store.transaction(() => {
      this.store.appendEvents(records);
      for (const r of records) if (r.kind === 'location') this.store.setPosition(`${MASTER_PREFIX}${r.location}`, JSON.stringify(r.record));
      for (const dl of deadLetters) this.store.putDeadLetter(deadLetterKey(dl.source), dl);
      if (position) this.store.setPosition(position.name, position.value);
      this.fault('log-appended');
    });
  }

  /** Location master data seen by the ingest side (for the deadline and feed-health clock). */
  masters(): Map<string, Location> {
    const rows = this.store.db.prepare("SELECT name, value FROM positions WHERE name LIKE 'master:%' ORDER BY name").all() as { name: string; value: string }[];
    return new Map(rows.map((r) => [r.name.slice(MASTER_PREFIX.length), JSON.parse(r.value) as Location]));
  }

  /** Applies everything logged so far, partition by partition; returns the closes made. */
  pump(): BatchResult['closes'][number][] {
    const closes: BatchResult['closes'][number][] = [];
    for (const stage of this.stages) {
      for (;;) {
        const from = Number(stage.nextOffset());
        if (from >= this.store.logEnd(stage.partition)) break;
        // One SQLite transaction per piece: a close's plans and manifest commit without what follows (batch-cuts.ts).
        for (const batch of cutAfterCloses(this.store.readEvents(stage.partition, from, this.batchSize))) {
          const result = stage.apply(batch);
          try {
            this.store.transaction(() => {
              this.store.writeOutputs(result.outputs);
              this.fault('outputs-written');
              this.store.writeChangelog(stage.partition, result.changelog);
              this.fault('changelog-written');
            });
          } catch (error) {
            // The SQLite transaction rolled back, so the state table holds the last committed state: rebuild from it.
            stage.abort();
            stage.restore(this.store.changelog(stage.partition));
            throw error;
          }
          this.fault('committed');
          stage.commit();
          closes.push(...result.closes);
          this.onBatch?.(stage.partition, result);
        }
      }
    }
    return closes;
  }

  /** True when every partition has applied the whole log. */
  caughtUp(): boolean {
    return this.stages.every((s) => Number(s.nextOffset()) >= this.store.logEnd(s.partition));
  }
}
