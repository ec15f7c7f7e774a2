import Database from 'better-sqlite3';
import { NearcastError } from '../../errors.ts';
import type { DeadLetterRecord } from '../../runtime/dead-letter.ts';
import { decodeEventLogRecord, encodeEventLogRecord, type EventLogRecord, type LogEntry } from '../../runtime/event-log-record.ts';
import { outputDataText } from '../../runtime/output-records.ts';
import { partitionFor } from '../../runtime/partitioner.ts';
import type { ChangelogEntry, OutputRecord, OutputTopic } from '../../runtime/stage-output.ts';
import { DDL, SCHEMA_VERSION } from './schema.ts';

export interface StoredOutput {
  readonly seq: number;
  readonly topic: OutputTopic;
  readonly key: string;
  readonly location: string | null;
  readonly id: string;
  readonly type: string;
  readonly source: string;
  readonly time: string | null;
  readonly subject: string | null;
  readonly dataschema: string | null;
  /** The record's JSON text, exactly as published. */
  readonly data: string;
}

export interface StoredDeadLetter {
  readonly key: string;
  readonly seq: number;
  readonly record: DeadLetterRecord;
}

/**
 * The embedded store on one SQLite file (WAL). Every write method expects to run inside `transaction()`, so a
 * batch's outputs, state changelog and consumed offset land together or not at all — SQLite's atomic commit gives
 * the guarantee Kafka transactions give in distributed mode.
 */
export class EmbeddedStore {
  readonly db: Database.Database;
  readonly partitions: number;
  private readonly nextOffsets: number[];
  private nextOutputSeq: number;
  private nextDeadLetterSeq: number;
  private readonly stmt;

  constructor(file: string, options: { partitions?: number } = {}) {
    this.db = new Database(file);
    this.db.pragma('journal_mode = WAL');
    // NORMAL is durable against a process crash in WAL mode (a power cut may lose the last commits, never tear one).
    this.db.pragma('synchronous = NORMAL');
    this.db.exec(DDL);
    const meta = (k: string) => (this.db.prepare('SELECT value FROM meta WHERE key = ?').get(k) as { value: string } | undefined)?.value;
    const stored = meta('partitions');
    const wanted = options.partitions ?? (stored ? Number(stored) : 1);
    if (stored && Number(stored) !== wanted) {
      this.db.close();
      throw new NearcastError('NEARCAST_CONFIG_INVALID', [`embedded database ${file} was created with ${stored} partitions, not ${wanted}`]);
    }
    if (!stored) {
      this.db.prepare('INSERT INTO meta (key, value) VALUES (?, ?), (?, ?)').run('partitions', String(wanted), 'schemaVersion', String(SCHEMA_VERSION));
    }
    this.partitions = wanted;
    this.stmt = {
      append: this.db.prepare('INSERT INTO event_log (part, off, location, kind, record) VALUES (?, ?, ?, ?, ?)'),
      read: this.db.prepare('SELECT off, record FROM event_log WHERE part = ? AND off >= ? ORDER BY off LIMIT ?'),
      state: this.db.prepare('SELECT key, value FROM state WHERE part = ? ORDER BY key'),
      putState: this.db.prepare('INSERT INTO state (part, key, value) VALUES (?, ?, ?) ON CONFLICT (part, key) DO UPDATE SET value = excluded.value'),
      delState: this.db.prepare('DELETE FROM state WHERE part = ? AND key = ?'),
      output: this.db.prepare(
        'INSERT INTO outputs (seq, topic, key, location, id, type, source, time, subject, dataschema, data) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)',
      ),
      latest: this.db.prepare('INSERT INTO latest (topic, key, location, seq) VALUES (?, ?, ?, ?) ON CONFLICT (topic, key) DO UPDATE SET seq = excluded.seq'),
      deadLetter: this.db.prepare(
        // A re-read of the same input (a feed resumed after a crash) finds its dead letter already there and keeps it.
        'INSERT INTO dead_letters (key, seq, location, type, code, record) VALUES (?, ?, ?, ?, ?, ?) ON CONFLICT (key) DO NOTHING',
      ),
      getPos: this.db.prepare('SELECT value FROM positions WHERE name = ?'),
      setPos: this.db.prepare('INSERT INTO positions (name, value) VALUES (?, ?) ON CONFLICT (name) DO UPDATE SET value = excluded.value'),
    };
    this.nextOffsets = Array.from({ length: wanted }, (_, p) => {
      const row = this.db.prepare('SELECT MAX(off) AS m FROM event_log WHERE part = ?').get(p) as { m: number | null };
      return row.m === null ? 0 : row.m + 1;
    });
    this.nextOutputSeq = ((this.db.prepare('SELECT MAX(seq) AS m FROM outputs').get() as { m: number | null }).m ?? 0) + 1;
    this.nextDeadLetterSeq = ((this.db.prepare('SELECT MAX(seq) AS m FROM dead_letters').get() as { m: number | null }).m ?? 0) + 1;
  }

  /** Runs `fn` in one SQLite transaction; in-memory counters roll back with it. */
  transaction<T>(fn: () => T): T {
    const saved = { offsets: [...this.nextOffsets], out: this.nextOutputSeq, dl: this.nextDeadLetterSeq };
    try {
      return this.db.transaction(fn)();
    } catch (error) {
      this.nextOffsets.splice(0, this.nextOffsets.length, ...saved.offsets);
      this.nextOutputSeq = saved.out;
      this.nextDeadLetterSeq = saved.dl;
      throw error;
    }
  }

  appendEvents(records: readonly EventLogRecord[]): { partition: number; offset: number }[] {
    return records.map((r) => {
      const partition = partitionFor(r.location, this.partitions);
      const offset = this.nextOffsets[partition]!;
      this.stmt.append.run(partition, offset, r.location, r.kind, encodeEventLogRecord(r));
      this.nextOffsets[partition] = offset + 1;
      return { partition, offset };
    });
  }

  logEnd(partition: number): number {
    return this.nextOffsets[partition]!;
  }

  readEvents(partition: number, fromOffset: number, limit: number): LogEntry[] {
    const rows = this.stmt.read.all(partition, fromOffset, limit) as { off: number; record: string }[];
    return rows.map((r) => ({ offset: String(r.off), record: decodeEventLogRecord(r.record) }));
  }

  changelog(partition: number): ChangelogEntry[] {
    return (this.stmt.state.all(partition) as { key: string; value: string }[]).map((r) => ({ key: r.key, value: r.value }));
  }

  writeChangelog(partition: number, entries: readonly ChangelogEntry[]): void {
    for (const e of entries) {
      if (e.value === null) this.stmt.delState.run(partition, e.key);
      else this.stmt.putState.run(partition, e.key, e.value);
    }
  }

  writeOutputs(outputs: readonly OutputRecord[]): void {
    for (const o of outputs) {
      if (o.topic === 'deadLetter') {
        this.putDeadLetter(o.key, o.event.data as DeadLetterRecord);
        continue;
      }
      const seq = this.nextOutputSeq++;
      const e = o.event;
      this.stmt.output.run(seq, o.topic, o.key, o.location, e.id, e.type, e.source, e.time ?? null, e.subject ?? null, e.dataschema ?? null, outputDataText(o));
      this.stmt.latest.run(o.topic, o.key, o.location, seq);
    }
  }

  putDeadLetter(key: string, record: DeadLetterRecord): void {
    const info = this.stmt.deadLetter.run(key, this.nextDeadLetterSeq, record.location, record.type, record.code, JSON.stringify(record));
    if (info.changes > 0) this.nextDeadLetterSeq++;
  }

  deleteDeadLetter(key: string): void {
    this.db.prepare('DELETE FROM dead_letters WHERE key = ?').run(key);
  }

  deadLetters(filter: { location?: string; code?: string } = {}): StoredDeadLetter[] {
    const rows = this.db
      .prepare(
        `SELECT key, seq, record FROM dead_letters WHERE (@location IS NULL OR location = @location) AND (@code IS NULL OR code = @code) ORDER BY seq`,
      )
      .all({ location: filter.location ?? null, code: filter.code ?? null }) as { key: string; seq: number; record: string }[];
    return rows.map((r) => ({ key: r.key, seq: r.seq, record: JSON.parse(r.record) as DeadLetterRecord }));
  }

  getPosition(name: string): string | undefined {
    return (this.stmt.getPos.get(name) as { value: string } | undefined)?.value;
  }

  setPosition(name: string, value: string): void {
    this.stmt.setPos.run(name, value);
  }

  /** Outputs of a topic in publication order, from `afterSeq` on. */
  outputs(topic: OutputTopic, options: { afterSeq?: number; limit?: number } = {}): StoredOutput[] {
    return this.db
      .prepare('SELECT * FROM outputs WHERE topic = ? AND seq > ? ORDER BY seq LIMIT ?')
      .all(topic, options.afterSeq ?? 0, options.limit ?? -1) as StoredOutput[];
  }

  /** The compacted view: the latest output per key of a topic, optionally for one location, in key order. */
  latest(topic: OutputTopic, options: { location?: string; keyPrefix?: string; limit?: number; afterKey?: string } = {}): StoredOutput[] {
    return this.db
      .prepare(
        `SELECT o.* FROM latest l JOIN outputs o ON o.seq = l.seq
         WHERE l.topic = @topic AND (@location IS NULL OR l.location = @location)
           AND (@prefix IS NULL OR substr(l.key, 1, length(@prefix)) = @prefix) AND l.key > @after
         ORDER BY l.key LIMIT @limit`,
      )
      .all({ topic, location: options.location ?? null, prefix: options.keyPrefix ?? null, after: options.afterKey ?? '', limit: options.limit ?? -1 }) as StoredOutput[];
  }

  close(): void {
    this.db.close();
  }
}
