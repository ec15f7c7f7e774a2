import { NearcastError } from '../errors.ts';
import { deadLetter } from './dead-letter.ts';
import type { EventLogRecord, LogEntry } from './event-log-record.ts';
import type { LocationModel, LocationModelFactory } from './location-model-port.ts';
import { LocationProcessor } from './location-processor.ts';
import { newRuntimeState, type LocationRuntimeState } from './location-runtime-state.ts';
import { deadLetterOutput } from './output-records.ts';
import type { SensingStage } from './sensing-stage-port.ts';
import { DEFAULT_STAGE_SETTINGS, type StageSettings } from './stage-settings.ts';
import { ParsedParts } from './parsed-parts.ts';
import { PARTITION_STATE_KEY, type BatchResult, type ChangelogEntry, type OutputRecord } from './stage-output.ts';

/** The state-corrupt error of a changelog entry that is not JSON, which names the entry itself. */
class NotJson extends NearcastError {}

interface LocationSlot {
  runtime: LocationRuntimeState;
  model: LocationModel;
}

interface PartitionState {
  readonly partition: number;
  readonly nextOffset: string;
}

export interface SensingStageOptions {
  readonly partition: number;
  readonly models: LocationModelFactory;
  readonly settings?: Partial<StageSettings>;
}

/**
 * The overlay is realised as "drop on failure": a batch mutates the working state in place; commit() keeps it,
 * abort() drops the whole partition state (as DESIGN section 6 prescribes after a failed transaction) and the
 * transport restores it from the changelog, which holds exactly the last committed state. No second copy of a
 * large state is kept in memory, and only the stage reads this state, so the effect is that of an overlay merged
 * on commit. Changelog entries: `location` → runtime state + the model's snapshot (or its base part), and
 * `location|part` → each part of a parted model that changed in the batch.
 */
class PartitionSensingStage implements SensingStage {
  readonly partition: number;
  private readonly settings: StageSettings;
  private readonly models: LocationModelFactory;
  private slots = new Map<string, LocationSlot>();
  private committedOffset = 0n;
  private workingOffset = 0n;
  private open = false;
  private dropped = false;

  constructor(options: SensingStageOptions) {
    this.partition = options.partition;
    this.models = options.models;
    this.settings = { ...DEFAULT_STAGE_SETTINGS, ...options.settings };
  }

  nextOffset(): string {
    return (this.open ? this.workingOffset : this.committedOffset).toString();
  }

  locations(): readonly string[] {
    return [...this.slots.keys()].sort();
  }

  apply(batch: readonly LogEntry[]): BatchResult {
    if (this.open) throw new Error('a batch is still open: commit() or abort() it first');
    if (this.dropped) throw new NearcastError('NEARCAST_STATE_CORRUPT', [`partition ${this.partition}: state was dropped after a failed batch; restore it first`]);
    const touched = new Set<string>();
    const outputs: OutputRecord[] = [];
    const closes: BatchResult['closes'][number][] = [];
    this.open = true;
    this.workingOffset = this.committedOffset;
    for (const entry of batch) {
      const offset = BigInt(entry.offset);
      if (offset < this.workingOffset) continue; // already applied (re-delivery after a restart)
      this.applyRecord(entry.record, touched, outputs, closes);
      this.workingOffset = offset + 1n;
    }
    const changelog: ChangelogEntry[] = [];
    if (this.settings.changelog) {
      for (const location of [...touched].sort()) changelog.push(...this.snapshotEntries(location, this.slots.get(location)!));
      const partitionState: PartitionState = { partition: this.partition, nextOffset: this.workingOffset.toString() };
      changelog.push({ key: PARTITION_STATE_KEY, value: JSON.stringify(partitionState) });
    }
    return { outputs, changelog, nextOffset: this.workingOffset.toString(), closes };
  }

  private snapshotEntries(location: string, slot: LocationSlot): ChangelogEntry[] {
    if (!slot.model.snapshotParts) return [{ key: location, value: JSON.stringify({ runtime: slot.runtime, model: slot.model.snapshot() }) }];
    const { base, parts } = slot.model.snapshotParts();
    const entries: ChangelogEntry[] = [{ key: location, value: JSON.stringify({ runtime: slot.runtime, model: base, parted: true }) }];
    for (const [part, value] of [...parts].sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0))) {
      entries.push({ key: `${location}|${part}`, value: value === null ? null : JSON.stringify(value) });
    }
    return entries;
  }

  commit(): void {
    if (!this.open) return;
    this.committedOffset = this.workingOffset;
    this.open = false;
  }

  abort(): void {
    this.slots = new Map();
    this.committedOffset = 0n;
    this.workingOffset = 0n;
    this.open = false;
    this.dropped = true;
  }

  restore(entries: Iterable<ChangelogEntry>): void {
    const latest = new Map<string, string | null>();
    for (const e of entries) latest.set(e.key, e.value);
    this.slots = new Map();
    this.committedOffset = 0n;
    this.open = false;
    this.dropped = false;
    // Kept as text and parsed part by part while each location is rebuilt (see parsed-parts.ts).
    const parts = new Map<string, Map<string, string>>();
    for (const [key, value] of latest) {
      const bar = key.indexOf('|');
      if (bar < 0 || value === null) continue;
      const location = key.slice(0, bar);
      let map = parts.get(location);
      if (!map) parts.set(location, (map = new Map()));
      map.set(key.slice(bar + 1), value);
    }
    for (const [key, value] of latest) {
      if (value === null || key.includes('|')) continue;
      if (key === PARTITION_STATE_KEY) {
        this.committedOffset = BigInt((JSON.parse(value) as PartitionState).nextOffset);
        continue;
      }
      this.slots.set(key, this.slotFrom(key, value, new ParsedParts(parts.get(key) ?? new Map(), (text, part) => this.parse(text, `${key}|${part}`))));
    }
    this.workingOffset = this.committedOffset;
  }

  private parse(text: string, key: string): unknown {
    try {
      return JSON.parse(text);
    } catch (error) {
      throw new NotJson('NEARCAST_STATE_CORRUPT', [`partition ${this.partition}: changelog entry ${key} is not JSON`], { cause: error });
    }
  }

  private slotFrom(location: string, text: string, parts: ReadonlyMap<string, unknown>): LocationSlot {
    const snap = this.parse(text, location) as { runtime: LocationRuntimeState; model: unknown; parted?: boolean };
    try {
      if (snap.parted) {
        if (!this.models.restoreParts) throw new Error('the model cannot restore a parted snapshot');
        return { runtime: snap.runtime, model: this.models.restoreParts(snap.model, parts) };
      }
      return { runtime: snap.runtime, model: this.models.restore(snap.model) };
    } catch (error) {
      // A part that is not JSON names its own entry (see parse).
      if (error instanceof NotJson) throw error;
      throw new NearcastError('NEARCAST_STATE_CORRUPT', [`partition ${this.partition}: the snapshot of ${location} could not be read`], { cause: error });
    }
  }

  private applyRecord(record: EventLogRecord, touched: Set<string>, outputs: OutputRecord[], closes: BatchResult['closes'][number][]): void {
    let slot = this.slots.get(record.location);
    if (!slot) {
      if (record.kind !== 'location') {
        outputs.push(
          deadLetterOutput(
            this.settings.eventSource,
            deadLetter({
              type: record.kind,
              code: 'NEARCAST_INPUT_UNKNOWN_LOCATION',
              issues: [{ path: 'location', message: `${record.location} is not in the location master data (replay this record once it is)` }],
              stage: 'sensing',
              source: record.source,
              location: record.location,
              arrivalMs: record.arrivalMs,
              raw: JSON.stringify(record.record),
            }),
          ),
        );
        return;
      }
      slot = { runtime: newRuntimeState(record.record, record.arrivalMs), model: this.models.create(record.record) };
      this.slots.set(record.location, slot);
    }
    touched.add(record.location);
    new LocationProcessor(slot.runtime, slot.model, this.settings, outputs, closes).handle(record);
  }
}

export function createSensingStage(options: SensingStageOptions): SensingStage {
  return new PartitionSensingStage(options);
}
