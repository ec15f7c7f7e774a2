import { hostname } from 'node:os';
import { randomUUID } from 'node:crypto';
import type { Topics } from '../../config/topics.ts';
import type { Logger } from '../../log.ts';
import type { SensingStage } from '../../runtime/sensing-stage-port.ts';
import { ChangelogReader } from './changelog-reader.ts';
import type { CrashPoints } from './crash-points.ts';
import type { GroupConsumer, KafkaPort, TopicPartition } from './kafka-port.ts';
import { SensingPartition, type LiveClockOptions } from './sensing-partition.ts';
import { transactionalBatchOptions } from './transactional-batches.ts';

// The sensing stage over Kafka: one group member consuming only the event log. Each assigned partition gets a
// SensingPartition (paused until restored); a partition that moves away is closed, dropping its state and producer.

export interface SensingConsumerOptions {
  readonly port: KafkaPort;
  readonly topics: Topics;
  readonly groupId: string;
  /** Prefix of the per-partition transactional ids; the same for every instance of one deployment. */
  readonly transactionalIdPrefix: string;
  readonly createStage: (partition: number) => SensingStage;
  readonly sessionTimeoutMs: number;
  readonly maxMessageBytes: number;
  readonly partitionsConsumedConcurrently: number;
  readonly crash: CrashPoints;
  readonly logger: Logger;
  readonly eventSource: string;
  readonly onCommitted?: (partition: number, nextOffset: string) => void;
  /** Each partition owner writes deadline closes and feed-health checks into the event log by this clock. */
  readonly clock?: LiveClockOptions;
}

export class SensingConsumer {
  readonly instanceId = `${hostname()}-${process.pid}-${randomUUID().slice(0, 8)}`;
  private readonly partitions = new Map<number, SensingPartition>();
  private readonly consumer: GroupConsumer;
  private readonly reader: ChangelogReader;
  private readonly log: Logger;
  private stopped = false;
  private crashed: ((error: Error) => void) | undefined;

  constructor(private readonly options: SensingConsumerOptions) {
    this.log = options.logger.child({ component: 'sensing' });
    this.consumer = options.port.consumer(
      transactionalBatchOptions({
        groupId: options.groupId,
        topics: [options.topics.events],
        sessionTimeoutMs: options.sessionTimeoutMs,
        partitionsConsumedConcurrently: options.partitionsConsumedConcurrently,
      }),
    );
    this.reader = new ChangelogReader(options.port, {
      topic: options.topics.changelog,
      groupId: `${options.groupId}.restore.${this.instanceId}`,
      logger: this.log,
    });
  }

  /** Partitions whose state is restored and which are consuming. */
  readyPartitions(): number[] {
    return [...this.partitions.values()].filter((p) => p.ready).map((p) => p.partition).sort((a, b) => a - b);
  }

  async start(onCrash: (error: Error) => void): Promise<void> {
    this.crashed = onCrash;
    await this.reader.start();
    await this.consumer.run({
      onAssignment: (assignment) => this.onAssignment(assignment),
      eachBatch: async (batch, ctx) => {
        const owner = this.partitions.get(batch.partition);
        if (owner) await owner.handleBatch(batch, ctx);
      },
      onCrash: (error) => this.crashed?.(error),
    });
  }

  private onAssignment(assignment: readonly TopicPartition[]): void {
    const mine = new Set(assignment.filter((tp) => tp.topic === this.options.topics.events).map((tp) => tp.partition));
    for (const [partition, owner] of this.partitions) {
      if (mine.has(partition)) continue;
      this.partitions.delete(partition);
      this.log.info({ partition }, 'partition moved away; dropping its state');
      void owner.close();
    }
    for (const partition of mine) {
      const owner = this.partitions.get(partition);
      if (owner) {
        owner.reposition();
        continue;
      }
      const created = new SensingPartition(partition, {
        port: this.options.port,
        consumer: this.consumer,
        reader: this.reader,
        topics: this.options.topics,
        groupId: this.options.groupId,
        transactionalId: (p) => `${this.options.transactionalIdPrefix}.${this.options.topics.events}.${p}`,
        createStage: this.options.createStage,
        maxMessageBytes: this.options.maxMessageBytes,
        crash: this.options.crash,
        logger: this.log,
        instanceId: this.instanceId,
        eventSource: this.options.eventSource,
        ...(this.options.onCommitted ? { onCommitted: this.options.onCommitted } : {}),
        ...(this.options.clock ? { clock: this.options.clock } : {}),
      });
      this.partitions.set(partition, created);
      void created.start();
    }
    this.log.info({ partitions: [...mine].sort((a, b) => a - b) }, 'event-log partitions assigned');
  }

  /** Leaves the group first (the partitions move on at once), then ends every partition's producer. */
  async stop(): Promise<void> {
    if (this.stopped) return;
    this.stopped = true;
    await this.consumer.stop().catch((err: unknown) => this.log.warn({ err }, 'leaving the group failed'));
    await Promise.all([...this.partitions.values()].map((p) => p.close()));
    this.partitions.clear();
    await this.reader.stop().catch(() => undefined);
  }
}
