import { rmSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { TestProject } from 'vitest/node';
import { NearcastError } from '../../src/errors.ts';
import {
  BROKER_ALTERNATIVES, brokerJarsPresent, javaProblem, localBrokerStatus, mavenProblem, startLocalBroker,
  waitUntilAnswering, warmUpBroker,
} from '../../scripts/kafka-local/local-broker.ts';
import type { KafkaBrokerSource } from './helpers/provided-context.ts';

// Finds or starts the one Kafka broker the integration suite talks to, in this order:
//  1. an existing broker named by KAFKA_BROKERS;
//  2. a testcontainers Kafka container, when a Docker engine answers (not exercised by this project's CI:
//     no Docker engine runs there);
//  3. the local broker from Maven Central jars (scripts/kafka-local), when Java 17+ is there (and Maven,
//     if the jars still have to be fetched).
// With none of them the run fails — never skips — and says which three ways exist.

const REPO_ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const STATE_DIR = path.join(REPO_ROOT, '.kafka-local', 'vitest');
// cp-kafka 7.9.x carries Apache Kafka 3.9.x, the version the jar broker pins (recalled from memory:
// Confluent's version table); KafkaContainer drives Confluent images only.
const DEFAULT_TESTCONTAINERS_IMAGE = 'confluentinc/cp-kafka:7.9.1';

interface FoundBroker {
  readonly brokers: string;
  readonly source: KafkaBrokerSource;
  readonly dir: string;
  readonly teardown?: () => Promise<void>;
}

export default async function setup(project: TestProject): Promise<(() => Promise<void>) | undefined> {
  const found = await findBroker();
  project.provide('kafkaBrokers', found.brokers);
  project.provide('kafkaBrokerSource', found.source);
  project.provide('kafkaBrokerDir', found.dir);
  console.log(`[kafka] integration tests use ${describe(found.source)} at ${found.brokers}`);
  return found.teardown;
}

async function findBroker(): Promise<FoundBroker> {
  const given = process.env.KAFKA_BROKERS?.trim();
  if (given) return useGivenBroker(given);

  const docker = await dockerProblem();
  if (docker === undefined) return startContainer();

  const java = javaProblem();
  const maven = brokerJarsPresent() ? undefined : mavenProblem();
  if (java === undefined && maven === undefined) return startJarBroker();

  const reasons = ['KAFKA_BROKERS is not set', `no Docker engine answered (${docker})`, ...[java, maven].filter((r) => r !== undefined)];
  const ci = process.env.CI === 'true' ? ['CI=true, where a missing broker always fails the run'] : [];
  throw new NearcastError('NEARCAST_BROKER_PRECONDITION', [`no Kafka broker for the integration tests: ${reasons.join('; ')}`, ...ci, BROKER_ALTERNATIVES]);
}

async function useGivenBroker(given: string): Promise<FoundBroker> {
  const bad = given.split(',').filter((b) => !/^[^\s:,]+:\d{1,5}$/.test(b.trim()));
  if (bad.length > 0) {
    throw new NearcastError('NEARCAST_CONFIG_INVALID', [`KAFKA_BROKERS must be host:port[,host:port...], got "${given}" (bad part: "${bad[0]}")`]);
  }
  const brokers = given.split(',').map((b) => b.trim()).join(',');
  await waitUntilAnswering(brokers, { timeoutMs: 30_000 });
  await warmUpBroker(brokers, { timeoutMs: 60_000 });
  return { brokers, source: 'env', dir: '' };
}

/** undefined when a container runtime answers, else why not. */
async function dockerProblem(): Promise<string | undefined> {
  try {
    const { getContainerRuntimeClient } = await import('testcontainers');
    await getContainerRuntimeClient();
    return undefined;
  } catch (err) {
    return (err as Error).message;
  }
}

async function startContainer(): Promise<FoundBroker> {
  const { KafkaContainer } = await import('@testcontainers/kafka');
  const container = await new KafkaContainer(process.env.KAFKA_TESTCONTAINERS_IMAGE ?? DEFAULT_TESTCONTAINERS_IMAGE)
    .withKraft()
    .withEnvironment({
      // The module sets the offsets topic and txn min ISR for one node but not this one (default 3).
      KAFKA_TRANSACTION_STATE_LOG_REPLICATION_FACTOR: '1',
      KAFKA_TRANSACTION_STATE_LOG_NUM_PARTITIONS: '1',
      KAFKA_AUTO_CREATE_TOPICS_ENABLE: 'false',
      KAFKA_LOG_CLEANER_BACKOFF_MS: '500',
    })
    .start();
  const brokers = `${container.getHost()}:${container.getMappedPort(9093)}`;
  try {
    await warmUpBroker(brokers, { timeoutMs: 120_000 });
  } catch (err) {
    await container.stop();
    throw err;
  }
  return { brokers, source: 'testcontainers', dir: '', teardown: async () => void (await container.stop()) };
}

async function startJarBroker(): Promise<FoundBroker> {
  // The fixed folder lets the next run find and kill a broker a crashed run left behind (fresh: true);
  // a second run going on at the same time gets a folder of its own instead of killing the first one's.
  const status = localBrokerStatus(STATE_DIR);
  const inUse = status.running && status.ownerPid !== process.pid && status.ownerAlive === true;
  const dir = inUse ? `${STATE_DIR}-${process.pid}` : STATE_DIR;
  const broker = await startLocalBroker({ dir, fresh: true });
  const t = broker.timings;
  console.log(`[kafka] local broker pid ${broker.pid}: answered after ${(t.answeringMs / 1000).toFixed(1)} s, warm-up ${(t.warmUpMs / 1000).toFixed(1)} s (state in ${dir})`);
  const teardown = async () => {
    await broker.stop();
    if (inUse) rmSync(dir, { recursive: true, force: true });
  };
  return { brokers: broker.brokers, source: 'jar', dir, teardown };
}

function describe(source: KafkaBrokerSource): string {
  return { env: 'the broker named by KAFKA_BROKERS', testcontainers: 'a testcontainers Kafka container', jar: 'the local Kafka broker from Maven Central jars' }[source];
}
