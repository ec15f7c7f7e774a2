// The transport port: everything nearcast needs from a Kafka client, in our own words. kafkajs sits behind it
// (kafkajs-port.ts); a maintained client can replace it by implementing these interfaces (DESIGN section 9).

export type Headers = Readonly<Record<string, string>>;

export interface OutgoingMessage {
  readonly topic: string;
  /** Every message nearcast writes is keyed (compacted topics refuse null keys). */
  readonly key: string;
  /** null is a tombstone. */
  readonly value: string | Buffer | null;
  readonly headers?: Headers;
  /** Explicit partition; otherwise the port's partitioner derives it from the key. */
  readonly partition?: number;
}

export interface IncomingMessage {
  readonly topic: string;
  readonly partition: number;
  /** Decimal offset. */
  readonly offset: string;
  readonly key: string | null;
  readonly value: Buffer | null;
  readonly headers: Headers;
  /** The record's timestamp (producer create time or broker log-append time), epoch ms. */
  readonly timestampMs: number;
}

export interface TopicPartition {
  readonly topic: string;
  readonly partition: number;
}

export interface WrittenOffset extends TopicPartition {
  readonly offset: string;
}

/** One open producer transaction. Offsets are the NEXT offsets to consume (last consumed + 1). */
export interface Transaction {
  send(messages: readonly OutgoingMessage[]): Promise<readonly WrittenOffset[]>;
  sendOffsets(groupId: string, offsets: readonly WrittenOffset[]): Promise<void>;
  commit(): Promise<void>;
  abort(): Promise<void>;
}

export interface TransactionalProducer {
  readonly transactionalId: string;
  /** Connects and registers the transactional id with the coordinator, fencing any older producer with it. */
  init(): Promise<void>;
  begin(): Promise<Transaction>;
  close(): Promise<void>;
}

export interface PlainProducer {
  send(messages: readonly OutgoingMessage[]): Promise<readonly WrittenOffset[]>;
  close(): Promise<void>;
}

export interface Batch extends TopicPartition {
  readonly messages: readonly IncomingMessage[];
  /** Offset of the last record in the fetched batch (may be a transaction marker after the last message). */
  readonly lastOffset: string;
  readonly highWatermark: string;
}

export interface BatchContext {
  /** Marks everything up to and including `offset` as processed, so the consumer fetches on from there. */
  resolve(offset: string): void;
  heartbeat(): Promise<void>;
  isRunning(): boolean;
  /** True when a seek made this batch obsolete. */
  isStale(): boolean;
}

export interface GroupConsumerOptions {
  readonly groupId: string;
  readonly topics: readonly string[];
  /** Where a partition without a committed offset starts. */
  readonly fromBeginning: boolean;
  readonly sessionTimeoutMs: number;
  readonly heartbeatIntervalMs: number;
  readonly partitionsConsumedConcurrently?: number;
  readonly maxWaitTimeMs?: number;
  /** The broker holds a fetch until this much data is there (or maxWaitTimeMs passed): fewer, larger batches. */
  readonly minBytes?: number;
  readonly maxBytesPerPartition?: number;
}

export interface GroupConsumerHandlers {
  /**
   * Called synchronously after every join of the group with this member's whole assignment, before any fetch of
   * the new generation; pausing partitions here keeps them from being fetched.
   */
  onAssignment(assignment: readonly TopicPartition[]): void;
  eachBatch(batch: Batch, context: BatchContext): Promise<void>;
  /**
   * After every fetched batch, including those holding only transaction markers or aborted records, which never
   * reach eachBatch: `lastOffset` is the position the consumer has read through.
   */
  onBatchEnd?(partition: TopicPartition, lastOffset: string): void;
  /** The client gave up (after its own retries); the member has left the group. */
  onCrash(error: Error): void;
}

export interface GroupConsumer {
  /** Joins the group and starts fetching; resolves once running. Offsets are never auto-committed. */
  run(handlers: GroupConsumerHandlers): Promise<void>;
  pause(partitions: readonly TopicPartition[]): void;
  resume(partitions: readonly TopicPartition[]): void;
  /** The next fetch of this partition starts at `offset`. */
  seek(partition: TopicPartition, offset: string): void;
  stop(): Promise<void>;
}

export interface TopicSpec {
  readonly topic: string;
  readonly partitions: number;
  readonly replicationFactor: number;
  readonly config: Readonly<Record<string, string>>;
}

export interface ExistingTopic {
  readonly topic: string;
  readonly partitions: number;
  readonly config: Readonly<Record<string, string>>;
}

export interface PartitionOffsets {
  readonly partition: number;
  /** First offset still in the log. */
  readonly low: string;
  /** Offset the next record will get. */
  readonly high: string;
}

export interface AdminPort {
  listTopics(): Promise<readonly string[]>;
  describeTopics(topics: readonly string[]): Promise<readonly ExistingTopic[]>;
  createTopics(specs: readonly TopicSpec[]): Promise<void>;
  alterTopicConfigs(topic: string, config: Readonly<Record<string, string>>): Promise<void>;
  createPartitions(topic: string, count: number): Promise<void>;
  topicOffsets(topic: string): Promise<readonly PartitionOffsets[]>;
  /** The group's committed next offset per partition of `topic` ('-1' where it has none). */
  groupOffsets(groupId: string, topic: string): Promise<readonly { partition: number; offset: string }[]>;
  deleteTopics(topics: readonly string[]): Promise<void>;
  close(): Promise<void>;
}

export interface KafkaPort {
  admin(): Promise<AdminPort>;
  producer(): Promise<PlainProducer>;
  /** Not yet connected; call init(). */
  transactionalProducer(transactionalId: string): TransactionalProducer;
  consumer(options: GroupConsumerOptions): GroupConsumer;
}

/** Kafka's error names as the port reports them (the client's own type string in `kafkaErrorType`). */
export function kafkaErrorType(error: unknown): string | undefined {
  let e: unknown = error;
  for (let depth = 0; depth < 5 && e && typeof e === 'object'; depth++) {
    const t = (e as { type?: unknown }).type;
    if (typeof t === 'string') return t;
    e = (e as { cause?: unknown; originalError?: unknown }).cause ?? (e as { originalError?: unknown }).originalError;
  }
  return undefined;
}
