// What the Kafka benchmarks share: a broker (KAFKA_BROKERS, else a throw-away local one), topics named for this
// run only, the configuration and port over them, and a count of what a topic holds as a consumer sees it.
import { execFileSync, spawnSync } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { loadConfig, type Config } from '../../src/config/config.ts';
import { DEFAULT_TOPICS, type Topics } from '../../src/config/topics.ts';
import { createLogger, type Logger } from '../../src/log.ts';
import { createKafkajsPort } from '../../src/transport/kafka/kafkajs-port.ts';
import type { KafkaPort } from '../../src/transport/kafka/kafka-port.ts';
import { ensureTopics, topicSpecs } from '../../src/transport/kafka/topic-setup.ts';
import { launchLocalBroker, stopLocalBroker } from '../kafka-local/broker-lifecycle.ts';

export interface BenchKafka {
  readonly brokers: string;
  readonly config: Config;
  readonly logger: Logger;
  readonly port: KafkaPort;
  /** Deletes this run's topics and stops the broker if this run started it. */
  close(): Promise<void>;
}

export interface BenchKafkaOptions {
  readonly partitions: number;
  /** Log level of nearcast's own logger (kafkajs follows it, see kafkajs-port.ts). */
  readonly logLevel?: 'warn' | 'info' | 'debug';
  /** Where log lines go; default stderr. */
  readonly logTo?: NodeJS.WritableStream;
  readonly brokerHeapMb?: number;
}

export const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));
export const perSecond = (n: number, ms: number) => Math.round((n / ms) * 1000);

export async function openBenchKafka(options: BenchKafkaOptions): Promise<BenchKafka> {
  let brokers = process.env.KAFKA_BROKERS;
  let brokerDir: string | undefined;
  if (!brokers) {
    brokerDir = mkdtempSync(path.join(os.tmpdir(), 'nearcast-bench-broker-'));
    const b = await launchLocalBroker({ dir: brokerDir, ownerPid: process.pid, heapMb: options.brokerHeapMb ?? 1024 });
    brokers = b.brokers;
  }
  const run = randomUUID().slice(0, 8);
  const topics = Object.fromEntries(Object.entries(DEFAULT_TOPICS).map(([r, t]) => [r, `bench-${run}.${t}`])) as unknown as Topics;
  const level = options.logLevel ?? 'warn';
  const config: Config = loadConfig({
    overrides: { kafka: { brokers, groupId: `bench-${run}`, partitions: options.partitions, sessionTimeoutMs: 10_000 }, topics, log: { level } },
  });
  const logger = createLogger(level, options.logTo ?? process.stderr);
  const port = createKafkajsPort({ brokers: brokers.split(','), clientId: 'nearcast-bench', logger });
  const admin = await port.admin();
  try {
    await ensureTopics(admin, topicSpecs(config));
  } finally {
    await admin.close();
  }
  return {
    brokers,
    config,
    logger,
    port,
    async close() {
      const a = await port.admin().catch(() => undefined);
      await a?.deleteTopics(Object.values(config.topics)).catch(() => undefined);
      await a?.close();
      if (brokerDir) {
        await stopLocalBroker(brokerDir);
        rmSync(brokerDir, { recursive: true, force: true });
      }
    },
  };
}

export const hasKcat = (): boolean => spawnSync('kcat', ['-V']).status === 0;

/**
 * Reads a whole topic with kcat (librdkafka reads committed records only by default, so transaction markers and
 * aborted records are not counted) and returns one `format` line per record plus the wall time it took.
 */
export function kcatRead(brokers: string, topic: string, format: string): { lines: string[]; ms: number } {
  const t = performance.now();
  const out = execFileSync('kcat', ['-C', '-b', brokers, '-t', topic, '-o', 'beginning', '-e', '-q', '-f', format], { maxBuffer: 1 << 30 });
  const ms = performance.now() - t;
  return { lines: out.toString().split('\n').filter(Boolean), ms };
}
