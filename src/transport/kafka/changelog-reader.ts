import type { Logger } from '../../log.ts';
import type { Batch, BatchContext, GroupConsumer, IncomingMessage, KafkaPort } from './kafka-port.ts';

// Reads one changelog partition from its first offset up to a given offset (the barrier its owner just committed).
// kafkajs cannot assign a partition without a consumer group, so one reader per process joins a group of its own,
// holds every changelog partition paused, and runs a partition only while a restore asks for it.

interface Request {
  readonly until: bigint;
  readonly onRecord: (record: IncomingMessage) => void;
  readonly done: (error?: Error) => void;
}

export interface ChangelogReaderOptions {
  readonly topic: string;
  /** Unique per process: no other member may share it. */
  readonly groupId: string;
  readonly logger: Logger;
}

export class ChangelogReader {
  private readonly consumer: GroupConsumer;
  private readonly requests = new Map<number, Request>();
  private readonly ready: Promise<void>;
  private assigned = new Set<number>();
  private markReady: () => void = () => undefined;

  constructor(
    private readonly port: KafkaPort,
    private readonly options: ChangelogReaderOptions,
  ) {
    this.consumer = port.consumer({
      groupId: options.groupId,
      topics: [options.topic],
      fromBeginning: true,
      sessionTimeoutMs: 30_000,
      heartbeatIntervalMs: 3_000,
      partitionsConsumedConcurrently: 4,
      maxWaitTimeMs: 100,
      maxBytesPerPartition: 4_194_304,
    });
    this.ready = new Promise((resolve) => (this.markReady = resolve));
  }

  async start(): Promise<void> {
    await this.consumer.run({
      onAssignment: (assignment) => {
        const mine = assignment.filter((tp) => tp.topic === this.options.topic);
        this.assigned = new Set(mine.map((tp) => tp.partition));
        this.consumer.pause(mine.filter((tp) => !this.requests.has(tp.partition)));
        this.markReady();
      },
      eachBatch: (batch, ctx) => this.onBatch(batch, ctx),
      onCrash: (error) => {
        this.options.logger.error({ err: error }, 'changelog reader stopped');
        for (const r of this.requests.values()) r.done(error);
        this.requests.clear();
      },
    });
    await this.ready;
  }

  /** Streams the records of `partition` in log order from `from` until the record at offset `until` is passed. */
  async read(partition: number, from: string, until: string, onRecord: (record: IncomingMessage) => void): Promise<void> {
    await this.ready;
    if (!this.assigned.has(partition)) throw new Error(`changelog reader holds no partition ${partition} of ${this.options.topic}`);
    if (this.requests.has(partition)) throw new Error(`a restore of changelog partition ${partition} is already running`);
    await new Promise<void>((resolve, reject) => {
      this.requests.set(partition, { until: BigInt(until), onRecord, done: (err) => (err ? reject(err) : resolve()) });
      const tp = { topic: this.options.topic, partition };
      try {
        this.consumer.seek(tp, from);
        this.consumer.resume([tp]);
      } catch (err) {
        // A request left behind would refuse every later restore of this partition as "already running".
        this.finish(partition, err as Error);
      }
    });
  }

  private async onBatch(batch: Batch, ctx: BatchContext): Promise<void> {
    const request = this.requests.get(batch.partition);
    const tp = { topic: batch.topic, partition: batch.partition };
    if (!request || ctx.isStale()) {
      if (!request) this.consumer.pause([tp]);
      return;
    }
    let reached = false;
    try {
      for (const m of batch.messages) {
        if (BigInt(m.offset) > request.until) {
          reached = true;
          break;
        }
        request.onRecord(m);
        if (BigInt(m.offset) === request.until) reached = true;
      }
    } catch (err) {
      this.finish(batch.partition, err as Error);
      return;
    }
    if (reached || BigInt(batch.lastOffset) >= request.until) this.finish(batch.partition);
    else {
      const last = batch.messages.at(-1);
      if (last) ctx.resolve(last.offset);
    }
  }

  private finish(partition: number, error?: Error): void {
    const request = this.requests.get(partition);
    this.requests.delete(partition);
    this.consumer.pause([{ topic: this.options.topic, partition }]);
    request?.done(error);
  }

  async stop(): Promise<void> {
    for (const r of this.requests.values()) r.done(new Error('changelog reader stopped'));
    this.requests.clear();
    await this.consumer.stop();
  }

  /** First offset still in each changelog partition (compaction never moves it, retention could). */
  async lowOffset(partition: number): Promise<string> {
    const admin = await this.port.admin();
    try {
      const offsets = await admin.topicOffsets(this.options.topic);
      return offsets.find((o) => o.partition === partition)?.low ?? '0';
    } finally {
      await admin.close();
    }
  }
}
