import { randomUUID } from 'node:crypto';
import type { Topics } from '../../config/topics.ts';
import type { Logger } from '../../log.ts';
import { cutAfterCloses } from '../../runtime/batch-cuts.ts';
import { deadLetter } from '../../runtime/dead-letter.ts';
import { decodeEventLogRecord, encodeEventLogRecord, type LogEntry } from '../../runtime/event-log-record.ts';
import type { SensingStage } from '../../runtime/sensing-stage-port.ts';
import { applyPartCounts, BARRIER_KEY, decodeChangelog, encodeChangelog, type PartCounts } from './changelog-codec.ts';
import type { ChangelogReader } from './changelog-reader.ts';
import { NO_CRASH_POINTS, type CrashPoints } from './crash-points.ts';
import type { Batch, BatchContext, GroupConsumer, IncomingMessage, KafkaPort, OutgoingMessage, TransactionalProducer } from './kafka-port.ts';
import { maxValueBytes } from './message-chunks.ts';
import { deadLetterMessage, outputMessage } from './output-messages.ts';
import { isClockKey, PartitionClock, type ClockChanges, type ClockSettings } from './partition-clock.ts';
import { runTransaction } from './transaction-runner.ts';

// The owner of one event-log partition in this process: its sensing stage, its transactional producer (one per
// partition, so the id fences a zombie owner), and the restore. Every batch is one transaction; on any failure the
// partition's state is dropped and rebuilt from the changelog, so memory never holds what Kafka did not commit.

export interface PartitionDeps {
  readonly port: KafkaPort;
  readonly consumer: GroupConsumer;
  readonly reader: ChangelogReader;
  readonly topics: Topics;
  readonly groupId: string;
  readonly transactionalId: (partition: number) => string;
  readonly createStage: (partition: number) => SensingStage;
  readonly maxMessageBytes: number;
  readonly crash: CrashPoints;
  readonly logger: Logger;
  readonly instanceId: string;
  readonly eventSource: string;
  /** Called after every committed batch (tests and metrics). */
  readonly onCommitted?: (partition: number, nextOffset: string) => void;
  /** The live clock (deadline closes and feed-health checks into the event log); absent = no clock records. */
  readonly clock?: LiveClockOptions;
}

export interface LiveClockOptions {
  /** The wall clock, epoch ms (injected in tests). */
  readonly now: () => number;
  /** How often the partition's owner asks which clock records are due, ms. */
  readonly intervalMs: number;
  readonly settings: ClockSettings;
}

type Status = 'restoring' | 'ready' | 'closed';

const sleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

export class SensingPartition {
  private status: Status = 'restoring';
  private stage: SensingStage | undefined;
  private producer: TransactionalProducer | undefined;
  private parts: PartCounts = new Map();
  /** Serialises batches, restores and close of this partition. */
  private chain: Promise<void> = Promise.resolve();
  private restoring: Promise<void> | undefined;
  private readonly clock: PartitionClock | undefined;
  private timer: NodeJS.Timeout | undefined;
  private ticking = false;
  private readonly log: Logger;
  private readonly tp: { topic: string; partition: number };

  constructor(
    readonly partition: number,
    private readonly deps: PartitionDeps,
  ) {
    this.tp = { topic: deps.topics.events, partition };
    this.log = deps.logger.child({ partition });
    this.clock = deps.clock ? new PartitionClock(deps.clock.settings) : undefined;
  }

  get ready(): boolean {
    return this.status === 'ready';
  }

  /** Nothing is fetched for the partition until its state is restored. */
  start(): Promise<void> {
    // Restoring before pausing: were the pause to throw, the partition would otherwise look ready without a state
    // and never be fetched again.
    this.status = 'restoring';
    this.restoring ??= this.restoreUntilDone().finally(() => (this.restoring = undefined));
    try {
      this.deps.consumer.pause([this.tp]);
    } catch (err) {
      this.log.warn({ err }, 'pausing the partition for its restore failed; its batches are ignored until restored');
    }
    return this.restoring;
  }

  /** After a rejoin that kept this partition: fetch on from the applied offset, whatever the group's offset says. */
  reposition(): void {
    if (this.status === 'ready' && this.stage) this.deps.consumer.seek(this.tp, this.stage.nextOffset());
  }

  handleBatch(batch: Batch, ctx: BatchContext): Promise<void> {
    const run = this.chain.then(() => this.applyBatch(batch, ctx));
    this.chain = run.catch(() => undefined);
    return run;
  }

  async close(): Promise<void> {
    this.status = 'closed';
    if (this.timer) clearInterval(this.timer);
    this.timer = undefined;
    const closing = this.chain.then(async () => {
      await this.restoring?.catch(() => undefined);
      this.stage = undefined;
      await this.producer?.close().catch(() => undefined);
      this.producer = undefined;
    });
    this.chain = closing.catch(() => undefined);
    await closing;
  }

  private async applyBatch(batch: Batch, ctx: BatchContext): Promise<void> {
    if (this.status !== 'ready' || !this.stage || !this.producer || ctx.isStale() || !ctx.isRunning()) return;
    const stage = this.stage;
    const next = BigInt(stage.nextOffset());
    const fresh = batch.messages.filter((m) => BigInt(m.offset) >= next);
    const last = batch.messages.at(-1);
    if (fresh.length === 0) {
      if (last) ctx.resolve(last.offset);
      return;
    }
    const { entries, unreadable } = this.decode(fresh);
    const end = BigInt(fresh.at(-1)!.offset) + 1n;
    // One transaction per piece (see batch-cuts.ts); a batch of unreadable messages only is one empty piece.
    const pieces = cutAfterCloses(entries);
    if (pieces.length === 0) pieces.push([]);
    try {
      let from = next;
      for (let k = 0; k < pieces.length; k++) {
        if (k > 0 && (ctx.isStale() || !ctx.isRunning())) return;
        const piece = pieces[k]!;
        const result = stage.apply(piece);
        const clockChanges: ClockChanges = this.clock?.observe(piece) ?? new Map();
        const upTo = k === pieces.length - 1 ? end : BigInt(result.nextOffset);
        const nextOffset = upTo.toString();
        const changelog = encodeChangelog(
          this.clock ? [...result.changelog, ...this.clock.changelog(clockChanges)] : result.changelog,
          { topic: this.deps.topics.changelog, partition: this.partition, generation: result.nextOffset, maxValueBytes: maxValueBytes(this.deps.maxMessageBytes) },
          this.parts,
        );
        const dead = unreadable.filter((u) => u.offset >= from && u.offset < upTo).map((u) => u.message);
        const messages: OutgoingMessage[] = [...result.outputs.map((o) => outputMessage(o, this.deps.topics)), ...dead, ...changelog.messages];
        await runTransaction(
          this.producer,
          { messages, offsets: { groupId: this.deps.groupId, offsets: [{ ...this.tp, offset: nextOffset }] } },
          { maxMessageBytes: this.deps.maxMessageBytes, crash: this.deps.crash, heartbeat: ctx.heartbeat },
        );
        this.deps.crash.pass('after-commit');
        stage.commit();
        applyPartCounts(this.parts, changelog.parts);
        this.clock?.accept(clockChanges);
        from = upTo;
        this.deps.onCommitted?.(this.partition, stage.nextOffset());
      }
      ctx.resolve(last!.offset);
    } catch (err) {
      this.log.warn({ err, firstOffset: fresh[0]!.offset }, 'batch not committed; dropping the partition state and restoring');
      this.dropAndRestore(stage);
    }
  }

  private dropAndRestore(stage: SensingStage): void {
    try {
      stage.abort();
    } catch {
      // the state is dropped below either way
    }
    this.stage = undefined;
    if ((this.status as Status) !== 'closed') void this.start();
  }

  /** Queues one clock check behind the partition's batches (a check already waiting makes this one redundant). */
  tickClock(): Promise<void> {
    if (this.ticking || !this.clock) return Promise.resolve();
    this.ticking = true;
    const run = this.chain
      .then(() => this.writeClockRecords())
      .catch((err: unknown) => this.log.warn({ err }, 'clock check failed; the next one tries again'))
      .finally(() => (this.ticking = false));
    this.chain = run;
    return run;
  }

  /**
   * Writes the deadline closes and feed-health checks due now into the event log, keyed by location (the location
   * partitioner puts them on this very partition, behind what is already there), together with the advanced
   * cursors in the changelog, in one transaction. A crash before the commit leaves neither, so the next owner
   * writes them once; after it, the restored cursors say they are written.
   */
  private async writeClockRecords(): Promise<void> {
    const clock = this.clock;
    const stage = this.stage;
    if (!clock || !this.deps.clock || this.status !== 'ready' || !stage || !this.producer) return;
    const nowMs = this.deps.clock.now();
    const { records, changes } = clock.due(nowMs);
    if (records.length === 0 && changes.size === 0) return;
    const events: OutgoingMessage[] = records.map((r) => ({ topic: this.deps.topics.events, key: r.location, value: encodeEventLogRecord(r) }));
    const changelog = encodeChangelog(
      clock.changelog(changes),
      { topic: this.deps.topics.changelog, partition: this.partition, generation: `clock@${nowMs}`, maxValueBytes: maxValueBytes(this.deps.maxMessageBytes) },
      this.parts,
    );
    try {
      await runTransaction(this.producer, { messages: [...events, ...changelog.messages] }, { maxMessageBytes: this.deps.maxMessageBytes, crash: this.deps.crash });
      applyPartCounts(this.parts, changelog.parts);
      clock.accept(changes);
      if (records.length > 0) this.log.info({ records: records.length, deadlineCloses: records.filter((r) => r.kind === 'deadline-close').length }, 'clock records written to the event log');
    } catch (err) {
      this.log.warn({ err }, 'clock records not committed; dropping the partition state and restoring');
      this.dropAndRestore(stage);
    }
  }

  /** An event-log record we cannot read is dead-lettered in the transaction that covers its offset instead of stopping the partition. */
  private decode(messages: readonly IncomingMessage[]): { entries: LogEntry[]; unreadable: { offset: bigint; message: OutgoingMessage }[] } {
    const entries: LogEntry[] = [];
    const unreadable: { offset: bigint; message: OutgoingMessage }[] = [];
    for (const m of messages) {
      try {
        entries.push({ offset: m.offset, record: decodeEventLogRecord(m.value ?? '') });
      } catch {
        const source = { kind: 'topic' as const, topic: m.topic, partition: m.partition, offset: m.offset };
        const record = deadLetter({
          type: 'unknown',
          code: 'NEARCAST_INPUT_MALFORMED_JSON',
          issues: [{ path: '', message: 'is not a nearcast event-log record' }],
          stage: 'sensing',
          source,
          location: m.key,
          arrivalMs: m.timestampMs,
          raw: m.value?.toString('utf8') ?? '',
        });
        unreadable.push({ offset: BigInt(m.offset), message: deadLetterMessage(record, this.deps.topics, this.deps.eventSource) });
      }
    }
    return { entries, unreadable };
  }

  private async restoreUntilDone(): Promise<void> {
    for (let attempt = 1; this.status !== 'closed'; attempt++) {
      try {
        await this.restoreOnce();
        return;
      } catch (err) {
        this.log.warn({ err, attempt }, 'restore failed; retrying');
        await sleep(Math.min(200 * 2 ** attempt, 5_000));
      }
    }
  }

  private async restoreOnce(): Promise<void> {
    const started = performance.now();
    // A fresh producer every time: InitProducerId bumps the epoch, fencing any other holder of the id and
    // aborting a transaction it left open, before we read what is committed.
    await this.producer?.close().catch(() => undefined);
    this.producer = this.deps.port.transactionalProducer(this.deps.transactionalId(this.partition));
    await this.producer.init();
    const barrier: OutgoingMessage = {
      topic: this.deps.topics.changelog,
      partition: this.partition,
      key: BARRIER_KEY,
      value: JSON.stringify({ by: this.deps.instanceId, nonce: randomUUID() }),
    };
    const [written] = await runTransaction(this.producer, { messages: [barrier] }, { maxMessageBytes: this.deps.maxMessageBytes, crash: NO_CRASH_POINTS });
    if (!written) throw new Error('the barrier write returned no offset');
    this.deps.crash.pass('after-barrier');
    // The restore's own split (fetch, decode, apply) goes into its log line: what a slow restore is waiting on.
    const fetchStarted = performance.now();
    const records: IncomingMessage[] = [];
    let bytes = 0;
    const from = await this.deps.reader.lowOffset(this.partition);
    await this.deps.reader.read(this.partition, from, written.offset, (r) => {
      records.push(r);
      bytes += (r.key === null ? 0 : Buffer.byteLength(r.key)) + (r.value?.length ?? 0);
      if (records.length === 1) this.deps.crash.pass('during-restore');
    });
    const decodeStarted = performance.now();
    const decoded = decodeChangelog(records);
    const applyStarted = performance.now();
    const stage = this.deps.createStage(this.partition);
    stage.restore(decoded.entries.filter((e) => !isClockKey(e.key)));
    this.clock?.restore(decoded.entries);
    const applied = performance.now();
    if (this.status === 'closed') return;
    this.stage = stage;
    this.parts = decoded.parts;
    this.status = 'ready';
    this.deps.consumer.seek(this.tp, stage.nextOffset());
    this.deps.consumer.resume([this.tp]);
    if (this.deps.clock && !this.timer) {
      this.timer = setInterval(() => void this.tickClock(), this.deps.clock.intervalMs);
      this.timer.unref();
    }
    // Catch up at once with what fell due while nobody owned the partition.
    void this.tickClock();
    this.log.info(
      {
        nextOffset: stage.nextOffset(),
        changelogRecords: records.length,
        keys: decoded.entries.length,
        bytes,
        ms: Math.round(performance.now() - started),
        barrierMs: Math.round(fetchStarted - started),
        fetchMs: Math.round(decodeStarted - fetchStarted),
        decodeMs: Math.round(applyStarted - decodeStarted),
        applyMs: Math.round(applied - applyStarted),
      },
      'partition restored',
    );
  }
}
