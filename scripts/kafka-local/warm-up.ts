import { Kafka, logLevel, type Admin } from 'kafkajs';
import { NearcastError } from '../../src/errors.ts';

// A fresh broker answers metadata requests seconds before it can serve groups or transactions: the
// consumer-offsets and transaction-state topics are only created on first use, and until they are the
// first test that needs them waits (or times out) on "coordinator not available". The warm-up takes that
// hit once, outside any test, by doing each of those things once.

export const WARM_UP_TOPIC = 'nearcast-warm-up';
const WARM_UP_GROUP = 'nearcast-warm-up';
const WARM_UP_TRANSACTIONAL_ID = 'nearcast-warm-up';

const sleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

/**
 * Polls until the broker answers a metadata request. `abortReason` is asked between attempts; when it returns
 * a reason (the JVM died, say) waiting stops at once with that reason instead of running out the clock.
 */
export async function waitUntilAnswering(
  brokers: string,
  { timeoutMs, abortReason }: { timeoutMs: number; abortReason?: () => string | undefined },
): Promise<void> {
  const deadline = performance.now() + timeoutMs;
  let lastError = 'no answer yet';
  for (;;) {
    const reason = abortReason?.();
    if (reason) throw new NearcastError('NEARCAST_KAFKA_UNAVAILABLE', [reason]);
    const admin = quietClient(brokers, { retries: 0 }).admin();
    try {
      await admin.connect();
      const cluster = await admin.describeCluster();
      if (cluster.brokers.length > 0) return;
    } catch (err) {
      lastError = (err as Error).message;
    } finally {
      await admin.disconnect().catch(() => undefined);
    }
    if (performance.now() > deadline) {
      throw new NearcastError('NEARCAST_KAFKA_UNAVAILABLE', [`${brokers} did not answer within ${timeoutMs / 1000} s (last error: ${lastError})`]);
    }
    await sleep(250);
  }
}

/** Creates a topic, joins a consumer group and commits one transaction (with the group's offset in it). */
export async function warmUpBroker(brokers: string, { timeoutMs }: { timeoutMs: number }): Promise<void> {
  const deadline = performance.now() + timeoutMs;
  const kafka = quietClient(brokers, { retries: 8 });
  const admin = kafka.admin();
  const producer = kafka.producer({ allowAutoTopicCreation: false });
  const consumer = kafka.consumer({ groupId: WARM_UP_GROUP, maxWaitTimeInMs: 100, sessionTimeout: 10_000, heartbeatInterval: 1_000, rebalanceTimeout: 10_000 });
  const txProducer = kafka.producer({ transactionalId: WARM_UP_TRANSACTIONAL_ID, idempotent: true, maxInFlightRequests: 1 });
  try {
    await admin.connect();
    await ensureTopic(admin);
    await producer.connect();
    await producer.send({ topic: WARM_UP_TOPIC, messages: [{ key: 'warm-up', value: 'plain' }] });

    await consumer.connect();
    await consumer.subscribe({ topics: [WARM_UP_TOPIC], fromBeginning: true });
    const first = new Promise<{ partition: number; offset: string }>((resolve) => {
      void consumer.run({ autoCommit: false, eachMessage: async ({ partition, message }) => resolve({ partition, offset: message.offset }) });
    });
    const seen = await withDeadline(first, deadline, 'the warm-up consumer group received nothing');

    await txProducer.connect();
    await retryUntil(deadline, 'the warm-up transaction', async () => {
      const tx = await txProducer.transaction();
      try {
        await tx.send({ topic: WARM_UP_TOPIC, messages: [{ key: 'warm-up', value: 'transactional' }] });
        await tx.sendOffsets({
          consumerGroupId: WARM_UP_GROUP,
          topics: [{ topic: WARM_UP_TOPIC, partitions: [{ partition: seen.partition, offset: String(BigInt(seen.offset) + 1n) }] }],
        });
        await tx.commit();
      } catch (err) {
        await tx.abort().catch(() => undefined);
        throw err;
      }
    });
  } finally {
    await Promise.allSettled([consumer.disconnect(), producer.disconnect(), txProducer.disconnect(), admin.disconnect()]);
  }
}

async function ensureTopic(admin: Admin): Promise<void> {
  // Resolves false when the topic already exists (a restarted broker keeps it): fine either way.
  await admin.createTopics({ topics: [{ topic: WARM_UP_TOPIC, numPartitions: 1, replicationFactor: 1 }], waitForLeaders: true });
}

async function retryUntil(deadline: number, what: string, attempt: () => Promise<void>): Promise<void> {
  for (;;) {
    try {
      await attempt();
      return;
    } catch (err) {
      // kafkajs does not retry CONCURRENT_TRANSACTIONS on AddOffsetsToTxn (tulios/kafkajs#430); we do.
      if (performance.now() > deadline) throw new NearcastError('NEARCAST_KAFKA_UNAVAILABLE', [`${what} failed: ${(err as Error).message}`], { cause: err });
      await sleep(500);
    }
  }
}

async function withDeadline<T>(promise: Promise<T>, deadline: number, what: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new NearcastError('NEARCAST_KAFKA_UNAVAILABLE', [`${what} in time`])), Math.max(0, deadline - performance.now()));
  });
  try {
    return await Promise.race([promise, timeout]);
  } finally {
    clearTimeout(timer);
  }
}

function quietClient(brokers: string, { retries }: { retries: number }): Kafka {
  return new Kafka({
    clientId: 'nearcast-broker-check',
    brokers: brokers.split(','),
    logLevel: logLevel.NOTHING,
    connectionTimeout: 3_000,
    requestTimeout: 10_000,
    retry: { retries, initialRetryTime: 200, maxRetryTime: 2_000 },
  });
}
