import { randomUUID } from 'node:crypto';
import { Kafka, logLevel, type IHeaders, type KafkaConfig } from 'kafkajs';
import { inject } from 'vitest';
import './provided-context.ts';

// Small helpers every integration test needs: where the broker is, names that never collide between tests
// or runs, a quiet client, and a "read until" consumer.

/** Bootstrap addresses of the broker the global setup found or started. */
export function brokers(): string[] {
  return inject('kafkaBrokers').split(',');
}

/** A topic (or group, or transactional id) name no other test or run uses: prefix plus a random suffix. */
export function uniqueTopic(prefix: string): string {
  if (!/^[A-Za-z0-9._-]{1,100}$/.test(prefix)) throw new Error(`topic prefix "${prefix}" must be 1-100 of A-Z a-z 0-9 . _ -`);
  return `${prefix}-${randomUUID()}`;
}
export const uniqueName = uniqueTopic;

const LOG_LEVELS: Record<string, logLevel> = { nothing: logLevel.NOTHING, error: logLevel.ERROR, warn: logLevel.WARN, info: logLevel.INFO, debug: logLevel.DEBUG };

/**
 * A kafkajs client for the test broker. Silent by default — kafkajs logs expected noise (first JoinGroup,
 * reconnects after a broker restart) at error level; set KAFKAJS_LOG_LEVEL=warn|info|debug to see it.
 */
export function kafka(overrides: Partial<KafkaConfig> = {}): Kafka {
  return new Kafka({
    clientId: 'nearcast-integration-test',
    brokers: brokers(),
    logLevel: LOG_LEVELS[process.env.KAFKAJS_LOG_LEVEL ?? 'nothing'] ?? logLevel.NOTHING,
    connectionTimeout: 3_000,
    retry: { retries: 8, initialRetryTime: 200, maxRetryTime: 3_000 },
    ...overrides,
  });
}

export interface ReceivedRecord {
  readonly topic: string;
  readonly partition: number;
  readonly offset: string;
  readonly key: string | null;
  readonly value: string | null;
  readonly headers: Readonly<Record<string, string>>;
}

export interface ConsumeUntilOptions {
  readonly topic: string;
  /** Stops once this returns true for everything received so far. */
  readonly until: (received: readonly ReceivedRecord[]) => boolean;
  /** Default: a new unique group, so reading starts at the beginning. */
  readonly groupId?: string;
  readonly readUncommitted?: boolean;
  readonly autoCommit?: boolean;
  readonly timeoutMs?: number;
  readonly client?: Kafka;
}

/** Joins a consumer group, reads from the beginning until `until` is satisfied, leaves the group. */
export async function consumeUntil(opts: ConsumeUntilOptions): Promise<ReceivedRecord[]> {
  const client = opts.client ?? kafka();
  const consumer = client.consumer({
    groupId: opts.groupId ?? uniqueName('test-group'),
    readUncommitted: opts.readUncommitted ?? false,
    maxWaitTimeInMs: 100,
    sessionTimeout: 10_000,
    rebalanceTimeout: 10_000,
    heartbeatInterval: 1_000,
  });
  const received: ReceivedRecord[] = [];
  const timeoutMs = opts.timeoutMs ?? 30_000;
  let timer: NodeJS.Timeout | undefined;
  try {
    await consumer.connect();
    await consumer.subscribe({ topics: [opts.topic], fromBeginning: true });
    await new Promise<void>((resolve, reject) => {
      timer = setTimeout(() => reject(new Error(`consumeUntil(${opts.topic}) timed out after ${timeoutMs} ms with ${received.length} records`)), timeoutMs);
      consumer
        .run({
          autoCommit: opts.autoCommit ?? true,
          eachMessage: async ({ topic, partition, message }) => {
            received.push({
              topic, partition, offset: message.offset,
              key: message.key?.toString('utf8') ?? null,
              value: message.value?.toString('utf8') ?? null,
              headers: decodeHeaders(message.headers),
            });
            if (opts.until(received)) resolve();
          },
        })
        .catch(reject);
    });
    return received;
  } finally {
    clearTimeout(timer);
    await consumer.disconnect();
  }
}

function decodeHeaders(headers: IHeaders | undefined): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [name, value] of Object.entries(headers ?? {})) {
    if (value === undefined) continue;
    out[name] = (Array.isArray(value) ? value : [value]).map((v) => v.toString()).join(',');
  }
  return out;
}
