import type { Config } from '../../config/config.ts';
import type { Topics } from '../../config/topics.ts';
import { RecordValidator } from '../../contracts/validate.ts';
import type { Logger } from '../../log.ts';
import { encodeEventLogRecord } from '../../runtime/event-log-record.ts';
import { ingest } from '../../runtime/ingest-stage.ts';
import type { CrashPoints } from './crash-points.ts';
import type { AdminPort, Batch, BatchContext, GroupConsumer, KafkaPort, OutgoingMessage, TopicPartition, TransactionalProducer } from './kafka-port.ts';
import { deadLetterMessage } from './output-messages.ts';
import { runTransaction } from './transaction-runner.ts';
import { transactionalBatchOptions } from './transactional-batches.ts';

// The ingest stage over Kafka: validates every input record through the runtime's ingest function and writes the
// good ones to the event log (keyed by location, placed by our partitioner) and the bad ones to the dead-letter
// topic, with the input offsets, in one transaction per batch. Alert commands take the same path: copied into the
// event log under their location, they reach whichever instance owns that location's partition, and a replay of
// the log applies them again in the same place.

/** Input topic role → the record type it carries. */
export function inputTypes(topics: Topics): Map<string, string> {
  return new Map([
    [topics.orders, 'order-line'],
    [topics.shipments, 'shipment'],
    [topics.baselines, 'baseline-version'],
    [topics.dayCloses, 'day-closed'],
    [topics.locations, 'location'],
    [topics.commands, 'alert-command'],
  ]);
}

export interface IngestConsumerOptions {
  readonly port: KafkaPort;
  readonly topics: Topics;
  readonly groupId: string;
  readonly transactionalIdPrefix: string;
  readonly limits: Config['limits'];
  readonly sessionTimeoutMs: number;
  readonly maxMessageBytes: number;
  readonly partitionsConsumedConcurrently: number;
  readonly crash: CrashPoints;
  readonly logger: Logger;
  readonly eventSource: string;
  readonly onCommitted?: (topic: string, partition: number, nextOffset: string, counts: { events: number; deadLetters: number }) => void;
}

interface Owner {
  readonly producer: TransactionalProducer;
  fenced: boolean;
}

export class IngestConsumer {
  private readonly consumer: GroupConsumer;
  private readonly validator: RecordValidator;
  private readonly types: Map<string, string>;
  private readonly owners = new Map<string, Owner>();
  private readonly log: Logger;
  private admin: AdminPort | undefined;
  private stopped = false;

  constructor(private readonly options: IngestConsumerOptions) {
    this.log = options.logger.child({ component: 'ingest' });
    this.types = inputTypes(options.topics);
    this.validator = new RecordValidator(options.limits);
    this.consumer = options.port.consumer(
      transactionalBatchOptions({
        groupId: options.groupId,
        topics: [...this.types.keys()],
        sessionTimeoutMs: options.sessionTimeoutMs,
        partitionsConsumedConcurrently: options.partitionsConsumedConcurrently,
      }),
    );
  }

  async start(onCrash: (error: Error) => void): Promise<void> {
    this.admin = await this.options.port.admin();
    await this.consumer.run({
      onAssignment: (assignment) => this.onAssignment(assignment),
      eachBatch: (batch, ctx) => this.onBatch(batch, ctx),
      onCrash,
    });
  }

  private onAssignment(assignment: readonly TopicPartition[]): void {
    const mine = new Set(assignment.map((tp) => `${tp.topic}:${tp.partition}`));
    for (const [key, owner] of this.owners) {
      if (mine.has(key)) continue;
      this.owners.delete(key);
      void owner.producer.close().catch(() => undefined);
    }
  }

  private async onBatch(batch: Batch, ctx: BatchContext): Promise<void> {
    const type = this.types.get(batch.topic);
    const last = batch.messages.at(-1);
    if (!type || !last || ctx.isStale() || !ctx.isRunning()) return;
    const key = `${batch.topic}:${batch.partition}`;
    let owner = this.owners.get(key);
    if (!owner) {
      owner = { producer: this.options.port.transactionalProducer(`${this.options.transactionalIdPrefix}.${batch.topic}.${batch.partition}`), fenced: false };
      this.owners.set(key, owner);
    }
    try {
      if (!owner.fenced) {
        // Fence the previous owner first, then ask where it got to: a batch it committed after our fetch began
        // must not be written to the event log twice.
        await owner.producer.init();
        owner.fenced = true;
        const committed = (await this.admin!.groupOffsets(this.options.groupId, batch.topic)).find((p) => p.partition === batch.partition)?.offset ?? '-1';
        if (BigInt(committed) > BigInt(batch.messages[0]!.offset)) {
          this.consumer.seek(batch, committed);
          return;
        }
      }
      const out: OutgoingMessage[] = [];
      let deadLetters = 0;
      for (const m of batch.messages) {
        const result = ingest(
          {
            type,
            value: m.value ?? '',
            source: { kind: 'topic', topic: m.topic, partition: m.partition, offset: m.offset },
            arrivalMs: m.timestampMs,
          },
          this.validator,
        );
        if (result.ok) {
          // As bytes once: the chunking and the client then take its length instead of measuring the text again.
          out.push({ topic: this.options.topics.events, key: result.record.location, value: Buffer.from(encodeEventLogRecord(result.record)) });
        } else {
          deadLetters++;
          out.push(deadLetterMessage(result.deadLetter, this.options.topics, this.options.eventSource));
        }
      }
      const nextOffset = (BigInt(last.offset) + 1n).toString();
      await runTransaction(
        owner.producer,
        { messages: out, offsets: { groupId: this.options.groupId, offsets: [{ topic: batch.topic, partition: batch.partition, offset: nextOffset }] } },
        { maxMessageBytes: this.options.maxMessageBytes, crash: this.options.crash, heartbeat: ctx.heartbeat },
      );
      ctx.resolve(last.offset);
      this.options.onCommitted?.(batch.topic, batch.partition, nextOffset, { events: out.length - deadLetters, deadLetters });
      if (deadLetters > 0) this.log.info({ topic: batch.topic, partition: batch.partition, deadLetters }, 'records quarantined to the dead-letter topic');
    } catch (err) {
      // Unresolved, the batch is fetched again; a new producer re-fences and re-reads the committed offset.
      this.log.warn({ err, topic: batch.topic, partition: batch.partition }, 'ingest batch not committed; retrying with a new producer');
      this.owners.delete(key);
      await owner.producer.close().catch(() => undefined);
      if (this.stopped) return;
      await new Promise((resolve) => setTimeout(resolve, 500));
    }
  }

  async stop(): Promise<void> {
    if (this.stopped) return;
    this.stopped = true;
    await this.consumer.stop().catch((err: unknown) => this.log.warn({ err }, 'leaving the group failed'));
    await Promise.all([...this.owners.values()].map((o) => o.producer.close().catch(() => undefined)));
    this.owners.clear();
    await this.admin?.close().catch(() => undefined);
  }
}
