import { randomUUID } from 'node:crypto';
import { loadConfig, type Config } from '../../../../src/config/config.ts';
import { DEFAULT_TOPICS, type Topics } from '../../../../src/config/topics.ts';
import { createLogger, type Logger } from '../../../../src/log.ts';
import { decodeEventLogRecord, encodeEventLogRecord, type EventLogRecord, type LogEntry } from '../../../../src/runtime/event-log-record.ts';
import type { SensingStage } from '../../../../src/runtime/sensing-stage-port.ts';
import type { OutputRecord } from '../../../../src/runtime/stage-output.ts';
import { toKafkaBinary } from '../../../../src/contracts/cloudevents.ts';
import { createKafkajsPort } from '../../../../src/transport/kafka/kafkajs-port.ts';
import type { IncomingMessage, KafkaPort, OutgoingMessage } from '../../../../src/transport/kafka/kafka-port.ts';
import { ensureTopics, topicSpecs } from '../../../../src/transport/kafka/topic-setup.ts';
import { brokers } from '../../helpers/kafka.ts';

// Shared set-up for the Kafka transport tests: a configuration whose every topic, group and transactional id is
// new for the test, a port, and readers that collect whole topics.

export interface TransportConfigOptions {
  readonly partitions?: number;
  /** Small on purpose in tests, so transactions really are split in chunks and snapshots in parts. */
  readonly maxMessageBytes?: number;
}

export function transportConfig(name: string, opts: TransportConfigOptions = {}): Config {
  const run = randomUUID().slice(0, 8);
  const topics = Object.fromEntries(Object.entries(DEFAULT_TOPICS).map(([role, t]) => [role, `${name}-${run}.${t}`])) as unknown as Topics;
  return loadConfig({
    overrides: {
      kafka: {
        brokers: brokers().join(','),
        clientId: `nearcast-test-${name}`,
        groupId: `${name}-${run}`,
        partitions: opts.partitions ?? 3,
        sessionTimeoutMs: 6_000, // the configuration's minimum: a dead member's partitions move within seconds
        maxMessageBytes: opts.maxMessageBytes ?? 16_384,
      },
      topics,
      log: { level: process.env.NEARCAST_TEST_LOG_LEVEL ?? 'silent' },
    },
  });
}

export function testLogger(config: Config): Logger {
  return createLogger(config.log.level, process.stderr);
}

export function testPort(config: Config): KafkaPort {
  return createKafkajsPort({ brokers: config.kafka.brokers!.split(','), clientId: config.kafka.clientId, logger: testLogger(config) });
}

export async function setUpTopics(config: Config, port = testPort(config)): Promise<void> {
  const admin = await port.admin();
  try {
    await ensureTopics(admin, topicSpecs(config));
  } finally {
    await admin.close();
  }
}

export async function produce(port: KafkaPort, messages: readonly OutgoingMessage[]): Promise<void> {
  const producer = await port.producer();
  try {
    for (let i = 0; i < messages.length; i += 500) await producer.send(messages.slice(i, i + 500));
  } finally {
    await producer.close();
  }
}

/** Event-log records written straight to the event log, keyed by location (the partitioner places them). */
export function eventLogMessages(config: Config, records: readonly EventLogRecord[]): OutgoingMessage[] {
  return records.map((r) => ({ topic: config.topics.events, key: r.location, value: encodeEventLogRecord(r) }));
}

/** Every record of `topic` (read committed) once its partitions reach the current end offsets. */
export async function readAll(port: KafkaPort, topic: string, timeoutMs = 30_000): Promise<IncomingMessage[]> {
  const admin = await port.admin();
  const ends = await admin.topicOffsets(topic);
  await admin.close();
  const remaining = new Map(ends.filter((e) => BigInt(e.high) > BigInt(e.low)).map((e) => [e.partition, BigInt(e.high)]));
  const out: IncomingMessage[] = [];
  if (remaining.size === 0) return out;
  const consumer = port.consumer({ groupId: `reader-${randomUUID()}`, topics: [topic], fromBeginning: true, sessionTimeoutMs: 10_000, heartbeatIntervalMs: 1_000, maxWaitTimeMs: 100 });
  let timer: NodeJS.Timeout | undefined;
  try {
    await new Promise<void>((resolve, reject) => {
      timer = setTimeout(() => reject(new Error(`readAll(${topic}) timed out with ${out.length} records`)), timeoutMs);
      consumer
        .run({
          onAssignment: () => undefined,
          onCrash: reject,
          eachBatch: async (batch, ctx) => {
            out.push(...batch.messages);
            ctx.resolve(batch.lastOffset);
          },
          // Batches of transaction markers only never reach eachBatch, but they do end here.
          onBatchEnd: (tp, lastOffset) => {
            if (tp.topic !== topic) return;
            if (BigInt(lastOffset) + 1n >= (remaining.get(tp.partition) ?? 0n)) remaining.delete(tp.partition);
            if (remaining.size === 0) resolve();
          },
        })
        .catch(reject);
    });
  } finally {
    clearTimeout(timer);
    await consumer.stop();
  }
  return out.sort((a, b) => a.partition - b.partition || (BigInt(a.offset) < BigInt(b.offset) ? -1 : 1));
}

/** What a consumer sees of one output message: key, ce_id and value; per partition in order. */
export function outputLines(messages: readonly IncomingMessage[]): string[] {
  return messages.map((m) => `${m.partition}|${m.key}|${m.headers.ce_id}|${m.value?.toString('utf8')}`);
}

/** The reference: the same event log applied in memory, one fresh stage per partition, outputs as they'd be written. */
export function replayInMemory(
  events: readonly IncomingMessage[],
  createStage: (partition: number) => SensingStage,
  topics: Topics,
): Map<string, string[]> {
  const byPartition = new Map<number, LogEntry[]>();
  for (const m of events) {
    const list = byPartition.get(m.partition) ?? [];
    list.push({ offset: m.offset, record: decodeEventLogRecord(m.value ?? '') });
    byPartition.set(m.partition, list);
  }
  const outputs: OutputRecord[] = [];
  for (const [partition, entries] of [...byPartition].sort(([a], [b]) => a - b)) {
    const stage = createStage(partition);
    outputs.push(...stage.apply(entries).outputs);
    stage.commit();
  }
  const byTopic = new Map<string, string[]>();
  for (const o of outputs) {
    const { value, headers } = toKafkaBinary(o.event);
    const line = `${o.key}|${headers.ce_id}|${value}`;
    const topic = topics[o.topic];
    byTopic.set(topic, [...(byTopic.get(topic) ?? []), line]);
  }
  return byTopic;
}

/** Output lines without the partition prefix, per topic, for comparison with replayInMemory. */
export function keyedLines(messages: readonly IncomingMessage[]): string[] {
  return messages.map((m) => `${m.key}|${m.headers.ce_id}|${m.value?.toString('utf8')}`);
}
