import {
  Kafka,
  type Admin,
  logLevel as KafkaLogLevel,
  type Consumer,
  type IHeaders,
  type KafkaConfig,
  type LogEntry,
  type Producer,
  type RecordMetadata,
  type SASLOptions,
} from 'kafkajs';
import type { Logger } from '../../log.ts';
import {
  kafkaErrorType,
  type AdminPort,
  type Batch,
  type GroupConsumer,
  type GroupConsumerHandlers,
  type GroupConsumerOptions,
  type Headers,
  type IncomingMessage,
  type KafkaPort,
  type OutgoingMessage,
  type PlainProducer,
  type TopicPartition,
  type Transaction,
  type TransactionalProducer,
  type WrittenOffset,
} from './kafka-port.ts';
import { ConsumerIntents } from './consumer-intents.ts';
import { ConsumerRestarts } from './consumer-restarts.ts';
import { createLocationPartitioner } from './location-partitioner.ts';

// kafkajs 2.2.4 behind the port. Its quirks are handled here and nowhere else: it has no rebalance listener (the
// GROUP_JOIN instrumentation event stands in), no partition assignment without a group, and it initialises a
// transactional producer lazily on its first transaction.

export interface KafkaClientSettings {
  readonly brokers: readonly string[];
  readonly clientId: string;
  readonly ssl?: boolean;
  readonly sasl?: { readonly mechanism: 'plain' | 'scram-sha-256' | 'scram-sha-512'; readonly username: string; readonly password: string };
  readonly logger: Logger;
  /** Transaction timeout asked of the coordinator; a dead producer's open transaction is aborted after it. */
  readonly transactionTimeoutMs?: number;
  readonly requestTimeoutMs?: number;
}

const LEVELS: Record<number, 'error' | 'warn' | 'info' | 'debug'> = {
  [KafkaLogLevel.ERROR]: 'error',
  [KafkaLogLevel.WARN]: 'warn',
  [KafkaLogLevel.INFO]: 'info',
  [KafkaLogLevel.DEBUG]: 'debug',
};

function kafkajsLogLevel(logger: Logger): KafkaLogLevel {
  // kafkajs INFO is one line per join, fetch and pause; our info level gets its warnings only.
  if (logger.isLevelEnabled('debug')) return KafkaLogLevel.INFO;
  if (logger.isLevelEnabled('warn')) return KafkaLogLevel.WARN;
  return logger.isLevelEnabled('error') ? KafkaLogLevel.ERROR : KafkaLogLevel.NOTHING;
}

/** Shared by every message without headers (nearly all of them), instead of an empty object each. */
const NO_HEADERS: Headers = Object.freeze({});

function headersIn(headers: IHeaders | undefined): Headers {
  if (headers === undefined) return NO_HEADERS;
  let any = false;
  for (const _ in headers) {
    any = true;
    break;
  }
  if (!any) return NO_HEADERS;
  const out: Record<string, string> = {};
  for (const [k, v] of Object.entries(headers)) {
    if (v === undefined) continue;
    out[k] = Array.isArray(v) ? String(v.at(-1) ?? '') : v.toString();
  }
  return out;
}

function messagesByTopic(messages: readonly OutgoingMessage[]) {
  const byTopic = new Map<string, { key: string; value: string | Buffer | null; headers?: Record<string, string>; partition?: number | undefined }[]>();
  for (const m of messages) {
    let list = byTopic.get(m.topic);
    if (!list) byTopic.set(m.topic, (list = []));
    // kafkajs reads key, value, headers and partition and ignores the rest, so a message goes as it is (no copy
    // per message); headers are copied since its type wants a mutable record.
    list.push(m.headers ? { ...m, headers: { ...m.headers } } : m);
  }
  return [...byTopic].map(([topic, msgs]) => ({ topic, messages: msgs }));
}

function written(metadata: readonly RecordMetadata[]): WrittenOffset[] {
  return metadata.map((m) => ({ topic: m.topicName, partition: m.partition, offset: m.baseOffset ?? '-1' }));
}

async function sendAll(send: Producer['sendBatch'], messages: readonly OutgoingMessage[]): Promise<WrittenOffset[]> {
  if (messages.length === 0) return [];
  return written(await send({ topicMessages: messagesByTopic(messages), acks: -1 }));
}

export function createKafkajsPort(settings: KafkaClientSettings): KafkaPort {
  const log = settings.logger.child({ component: 'kafkajs' });
  const config: KafkaConfig = {
    clientId: settings.clientId,
    brokers: [...settings.brokers],
    ssl: settings.ssl ?? false,
    ...(settings.sasl ? { sasl: settings.sasl as SASLOptions } : {}),
    connectionTimeout: 3_000,
    requestTimeout: settings.requestTimeoutMs ?? 30_000,
    retry: { retries: 8, initialRetryTime: 200, maxRetryTime: 5_000 },
    logLevel: kafkajsLogLevel(settings.logger),
    logCreator: () => (entry: LogEntry) => {
      const { message, ...fields } = entry.log;
      // We replace a producer after any failed send, so a bounded retry count cannot corrupt its sequence numbers.
      if (message.startsWith('Limiting retries for the idempotent producer')) return;
      log[LEVELS[entry.level] ?? 'info']({ namespace: entry.namespace, ...fields }, message);
    },
  };
  const kafka = new Kafka(config);
  const transactionTimeout = settings.transactionTimeoutMs ?? 60_000;

  return {
    async admin(): Promise<AdminPort> {
      const admin = kafka.admin();
      await admin.connect();
      return {
        listTopics: () => admin.listTopics(),
        async describeTopics(topics) {
          const meta = await admin.fetchTopicMetadata({ topics: [...topics] });
          const configs = await admin.describeConfigs({
            includeSynonyms: false,
            resources: topics.map((name) => ({ type: 2 /* TOPIC */, name })),
          });
          return meta.topics.map((t) => {
            const res = configs.resources.find((r) => r.resourceName === t.name);
            const config: Record<string, string> = {};
            // configSource 1 = DYNAMIC_TOPIC_CONFIG: set on the topic itself, not inherited from the broker.
            for (const e of res?.configEntries ?? []) if (e.configSource === 1 && e.configValue !== null) config[e.configName] = e.configValue;
            return { topic: t.name, partitions: t.partitions.length, config };
          });
        },
        async createTopics(specs) {
          const topics = specs.map((s) => s.topic);
          try {
            await admin.createTopics({
              waitForLeaders: true,
              topics: specs.map((s) => ({
                topic: s.topic,
                numPartitions: s.partitions,
                replicationFactor: s.replicationFactor,
                configEntries: Object.entries(s.config).map(([name, value]) => ({ name, value })),
              })),
            });
          } catch (err) {
            // KRaft announces a new topic before its partitions are served (KAFKA-15780; tulios/kafkajs#815): the
            // topics exist, so wait until every partition has a leader instead of failing the set-up.
            if (!['UNKNOWN_TOPIC_OR_PARTITION', 'LEADER_NOT_AVAILABLE'].includes(kafkaErrorType(err) ?? '')) throw err;
            await waitForLeaders(admin, topics);
          }
        },
        async alterTopicConfigs(topic, cfg) {
          // AlterConfigs (not incremental) replaces the topic's whole override set: pass everything to keep.
          await admin.alterConfigs({
            validateOnly: false,
            resources: [{ type: 2, name: topic, configEntries: Object.entries(cfg).map(([name, value]) => ({ name, value })) }],
          });
        },
        async createPartitions(topic, count) {
          await admin.createPartitions({ topicPartitions: [{ topic, count }] });
        },
        async topicOffsets(topic) {
          const offsets = await admin.fetchTopicOffsets(topic);
          return offsets.map((o) => ({ partition: o.partition, low: o.low, high: o.high }));
        },
        async groupOffsets(groupId, topic) {
          const [res] = await admin.fetchOffsets({ groupId, topics: [topic] });
          return (res?.partitions ?? []).map((p) => ({ partition: p.partition, offset: p.offset }));
        },
        async deleteTopics(topics) {
          await admin.deleteTopics({ topics: [...topics] });
        },
        close: () => admin.disconnect(),
      };
    },

    async producer(): Promise<PlainProducer> {
      const producer = kafka.producer({ createPartitioner: createLocationPartitioner, allowAutoTopicCreation: false, idempotent: true, maxInFlightRequests: 1 });
      await producer.connect();
      return { send: (messages) => sendAll((b) => producer.sendBatch(b), messages), close: () => producer.disconnect() };
    },

    transactionalProducer(transactionalId: string): TransactionalProducer {
      const producer = kafka.producer({
        createPartitioner: createLocationPartitioner,
        allowAutoTopicCreation: false,
        transactionalId,
        idempotent: true,
        maxInFlightRequests: 1,
        transactionTimeout,
      });
      let connected = false;
      return {
        transactionalId,
        async init() {
          if (!connected) {
            await producer.connect();
            connected = true;
          }
          // kafkajs sends InitProducerId on the first transaction(); an empty one ends without a request.
          const tx = await producer.transaction();
          await tx.abort();
        },
        async begin(): Promise<Transaction> {
          const tx = await producer.transaction();
          return {
            send: (messages) => sendAll((b) => tx.sendBatch(b), messages),
            sendOffsets: (groupId, offsets) =>
              tx.sendOffsets({
                consumerGroupId: groupId,
                topics: groupOffsets(offsets),
              }),
            commit: () => tx.commit(),
            abort: () => tx.abort(),
          };
        },
        async close() {
          if (connected) await producer.disconnect();
          connected = false;
        },
      };
    },

    consumer(options: GroupConsumerOptions): GroupConsumer {
      const consumer: Consumer = kafka.consumer({
        groupId: options.groupId,
        sessionTimeout: options.sessionTimeoutMs,
        heartbeatInterval: options.heartbeatIntervalMs,
        // A member that does not rejoin within this is dropped; kept close to the session timeout so a rebalance
        // after a crash does not wait long for a member that will never answer.
        rebalanceTimeout: Math.max(options.sessionTimeoutMs * 2, 10_000),
        maxWaitTimeInMs: options.maxWaitTimeMs ?? 500,
        minBytes: options.minBytes ?? 1,
        maxBytesPerPartition: options.maxBytesPerPartition ?? 2_097_152,
        allowAutoTopicCreation: false,
        readUncommitted: false,
        retry: { retries: 8, initialRetryTime: 300, maxRetryTime: 5_000 },
      });
      const intents = new ConsumerIntents(consumer);
      let restarts: ConsumerRestarts | undefined;
      return {
        async run(handlers: GroupConsumerHandlers) {
          consumer.on(consumer.events.GROUP_JOIN, (event) => {
            restarts?.joined();
            const assignment: TopicPartition[] = [];
            for (const [topic, partitions] of Object.entries(event.payload.memberAssignment)) {
              for (const partition of partitions) assignment.push({ topic, partition });
            }
            intents.rejoined();
            handlers.onAssignment(assignment);
          });
          if (handlers.onBatchEnd) {
            const onBatchEnd = handlers.onBatchEnd.bind(handlers);
            consumer.on(consumer.events.END_BATCH_PROCESS, (event) => {
              onBatchEnd({ topic: event.payload.topic, partition: event.payload.partition }, event.payload.lastOffset);
            });
          }
          const begin = async () => {
            await consumer.connect();
            await consumer.subscribe({ topics: [...options.topics], fromBeginning: options.fromBeginning });
            await consumer.run({
              autoCommit: false,
              eachBatchAutoResolve: false,
              partitionsConsumedConcurrently: options.partitionsConsumedConcurrently ?? 1,
              eachBatch: async ({ batch, resolveOffset, heartbeat, isRunning, isStale }) => {
                const messages: IncomingMessage[] = batch.messages.map((m) => ({
                  topic: batch.topic,
                  partition: batch.partition,
                  offset: m.offset,
                  key: m.key === null || m.key === undefined ? null : m.key.toString(),
                  value: m.value ?? null,
                  headers: headersIn(m.headers),
                  timestampMs: Number(m.timestamp),
                }));
                const ours: Batch = {
                  topic: batch.topic,
                  partition: batch.partition,
                  messages,
                  lastOffset: batch.lastOffset(),
                  highWatermark: batch.highWatermark,
                };
                await handlers.eachBatch(ours, { resolve: resolveOffset, heartbeat, isRunning, isStale });
              },
            });
          };
          const log = settings.logger.child({ component: 'kafka-consumer', groupId: options.groupId });
          const policy = new ConsumerRestarts(begin, (error) => handlers.onCrash(error), log);
          restarts = policy;
          consumer.on(consumer.events.CRASH, (event) => policy.crashed(event.payload.error, event.payload.restart));
          await begin();
        },
        pause: (partitions) => intents.pause(partitions),
        resume: (partitions) => intents.resume(partitions),
        seek: (tp, offset) => intents.seek(tp, offset),
        stop: () => {
          restarts?.stop();
          return consumer.disconnect();
        },
      };
    },
  };
}

async function waitForLeaders(admin: Admin, topics: readonly string[], timeoutMs = 30_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    try {
      const meta = await admin.fetchTopicMetadata({ topics: [...topics] });
      if (meta.topics.every((t) => t.partitions.length > 0 && t.partitions.every((p) => p.leader >= 0))) return;
    } catch (err) {
      if (Date.now() > deadline) throw err;
    }
    if (Date.now() > deadline) throw new Error(`topics ${topics.join(', ')} have no leader after ${timeoutMs} ms`);
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
}

function groupOffsets(offsets: readonly WrittenOffset[]): { topic: string; partitions: { partition: number; offset: string }[] }[] {
  const byTopic = new Map<string, { partition: number; offset: string }[]>();
  for (const o of offsets) byTopic.set(o.topic, [...(byTopic.get(o.topic) ?? []), { partition: o.partition, offset: o.offset }]);
  return [...byTopic].map(([topic, partitions]) => ({ topic, partitions }));
}
