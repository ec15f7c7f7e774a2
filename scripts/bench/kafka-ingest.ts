// Benchmark: end-to-end ingest rate over Kafka (input topic → ingest stage → event log → sensing stage → applied
// state, transactions on), next to two raw consume rates of the same input topic in the same run — kafkajs with no
// processing, and kcat (librdkafka) — with both ratios; then the restore time of the sensing state from the
// changelog. Where the time goes is split into the stage's apply (state + snapshots) and the rest (Kafka I/O,
// parse, validation, transactions).
//
//   node --import tsx scripts/bench/kafka-ingest.ts   (BENCH_RECORDS=100000 BENCH_LOCATIONS=50 BENCH_MODELS=core|tally)
// Uses KAFKA_BROKERS when set, else starts a throw-away local broker (scripts/kafka-local).

import { execFileSync, spawnSync } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { loadConfig, type Config } from '../../src/config/config.ts';
import { DEFAULT_TOPICS, type Topics } from '../../src/config/topics.ts';
import { createLogger } from '../../src/log.ts';
import { RecordValidator } from '../../src/contracts/validate.ts';
import { encodeEventLogRecord } from '../../src/runtime/event-log-record.ts';
import { ingest } from '../../src/runtime/ingest-stage.ts';
import { createSensingStage } from '../../src/runtime/sensing-stage.ts';
import type { SensingStage } from '../../src/runtime/sensing-stage-port.ts';
import { createKafkajsPort } from '../../src/transport/kafka/kafkajs-port.ts';
import type { KafkaPort, OutgoingMessage } from '../../src/transport/kafka/kafka-port.ts';
import { kafkaGroupIds, serveKafka } from '../../src/transport/kafka/serve-kafka.ts';
import { ensureTopics, topicSpecs } from '../../src/transport/kafka/topic-setup.ts';
import { createCoreModels } from '../../src/runtime/core-location-model.ts';
import { tallyModels } from '../../test/integration/kafka-transport/helpers/tally-models.ts';
import { launchLocalBroker, stopLocalBroker } from '../kafka-local/broker-lifecycle.ts';

const RECORDS = Number(process.env.BENCH_RECORDS ?? 50_000);
const LOCATIONS = Number(process.env.BENCH_LOCATIONS ?? 50);
const ITEMS = Number(process.env.BENCH_ITEMS ?? 40);
const PARTITIONS = Number(process.env.BENCH_PARTITIONS ?? 6);
/** `core` = the real sensing and monitoring engine; `tally` = a trivial sum per item, to see the transport's own cost. */
const MODELS = process.env.BENCH_MODELS === 'tally' ? 'tally' : 'core';
const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));
const rate = (n: number, ms: number) => Math.round((n / ms) * 1000);

async function main(): Promise<void> {
  let brokers = process.env.KAFKA_BROKERS;
  let brokerDir: string | undefined;
  if (!brokers) {
    brokerDir = mkdtempSync(path.join(os.tmpdir(), 'nearcast-bench-broker-'));
    const b = await launchLocalBroker({ dir: brokerDir, ownerPid: process.pid, heapMb: 1024 });
    brokers = b.brokers;
  }
  const run = randomUUID().slice(0, 8);
  const topics = Object.fromEntries(Object.entries(DEFAULT_TOPICS).map(([r, t]) => [r, `bench-${run}.${t}`])) as unknown as Topics;
  const config: Config = loadConfig({
    overrides: { kafka: { brokers, groupId: `bench-${run}`, partitions: PARTITIONS, sessionTimeoutMs: 10_000 }, topics, log: { level: 'warn' } },
  });
  const logger = createLogger('warn', process.stderr);
  const port = timedPort(createKafkajsPort({ brokers: brokers.split(','), clientId: 'nearcast-bench', logger }));
  try {
    const admin = await port.admin();
    await ensureTopics(admin, topicSpecs(config));
    await admin.close();
    console.log(`nearcast Kafka ingest benchmark: ${RECORDS} order lines, ${LOCATIONS} locations × ${ITEMS} items, ${PARTITIONS} partitions, ${MODELS} models`);

    await produceInputs(port, config);
    const raw = await kafkajsRawRate(port, config.topics.orders);
    const kcatMs = kcatRaw(brokers, config.topics.orders);

    let applyMs = 0;
    let applied = 0;
    const timed = (partition: number): SensingStage => {
      const stage = createSensingStage({ partition, models: MODELS === 'tally' ? tallyModels : createCoreModels({ demandBasis: 'orders' }), settings: { demandBasis: 'orders' } });
      return {
        ...stage,
        partition: stage.partition,
        nextOffset: () => stage.nextOffset(),
        locations: () => stage.locations(),
        commit: () => stage.commit(),
        abort: () => stage.abort(),
        restore: (e) => stage.restore(e),
        apply(batch) {
          const t = performance.now();
          const r = stage.apply(batch);
          applyMs += performance.now() - t;
          applied += batch.length;
          return r;
        },
      };
    };
    const total = RECORDS + LOCATIONS;
    const started = performance.now();
    const cpuStarted = process.cpuUsage();
    const service = await serveKafka(config, logger, { createStage: timed, handleSignals: false, setUpTopics: false, port });
    while (applied < total) await sleep(50);
    const e2eMs = performance.now() - started;
    const e2eCpu = process.cpuUsage(cpuStarted);
    await service.stop();

    const restoreStarted = performance.now();
    const again = await serveKafka(config, logger, { stages: ['sensing'], createStage: timed, handleSignals: false, setUpTopics: false, port });
    while ((again.sensing?.readyPartitions().length ?? 0) < PARTITIONS) await sleep(20);
    const restoreMs = performance.now() - restoreStarted;
    await again.stop();

    const validationMs = validationAlone();
    const e2e = rate(total, e2eMs);
    console.log(`kafkajs raw consume      ${rate(RECORDS, raw).toString().padStart(9)} records/s  (${Math.round(raw)} ms)`);
    if (kcatMs !== undefined) console.log(`kcat raw consume         ${rate(RECORDS, kcatMs).toString().padStart(9)} records/s  (${Math.round(kcatMs)} ms)`);
    else console.log('kcat raw consume         not measured: kcat is not installed (apt-get install -y kcat)');
    console.log(`end to end (tx on)       ${e2e.toString().padStart(9)} records/s  (${Math.round(e2eMs)} ms, incl. group joins and first restore)`);
    console.log(`  of which stage apply   ${Math.round(applyMs)} ms (state + snapshots); Kafka, parse, validation, transactions: ${Math.round(e2eMs - applyMs)} ms`);
    // Wall time swings with the broker and whatever else shares the machine; this process's CPU time is steadier.
    console.log(`  nearcast process CPU during it: ${Math.round((e2eCpu.user + e2eCpu.system) / 1000)} ms (the rest of the wall time is waiting on the broker)`);
    console.log(`  ingest parse + validation + event-log encoding alone, in memory: ${Math.round(validationMs)} ms`);
    for (const [stage, t] of Object.entries(txStats)) {
      console.log(`  ${stage} transactions: ${t.count}, ${t.messages} messages, ${(t.bytes / 1_048_576).toFixed(1)} MiB, ${Math.round(t.ms)} ms open in total`);
      console.log(`    of which begin ${Math.round(t.beginMs)} ms, sends ${Math.round(t.sendMs)} ms, offsets ${Math.round(t.offsetsMs)} ms, commit ${Math.round(t.commitMs)} ms`);
    }
    console.log(`ratio end to end / kafkajs raw   ${(e2e / rate(RECORDS, raw)).toFixed(2)}  (target ≥ 0.5)`);
    if (kcatMs !== undefined) console.log(`ratio end to end / kcat raw      ${(e2e / rate(RECORDS, kcatMs)).toFixed(2)}`);
    console.log(`restore of ${PARTITIONS} partitions (${LOCATIONS} locations) from the changelog: ${Math.round(restoreMs)} ms (incl. group join)`);
    console.log(`groups: ${JSON.stringify(kafkaGroupIds(config))}`);
  } finally {
    const admin = await port.admin().catch(() => undefined);
    await admin?.deleteTopics(Object.values(config.topics)).catch(() => undefined);
    await admin?.close();
    if (brokerDir) {
      await stopLocalBroker(brokerDir);
      rmSync(brokerDir, { recursive: true, force: true });
    }
  }
}

async function produceInputs(port: KafkaPort, config: Config): Promise<void> {
  const producer = await port.producer();
  const locs = Array.from({ length: LOCATIONS }, (_, i) => `DC-${String(i + 1).padStart(4, '0')}`);
  await producer.send(locs.map((l) => ({ topic: config.topics.locations, key: l, value: JSON.stringify({ location: l, timeZone: 'Europe/Berlin' }) })));
  // Master data first, so no line names a location the sensing stage has not seen yet.
  await sleep(3_000);
  let batch: OutgoingMessage[] = [];
  for (let i = 0; i < RECORDS; i++) {
    const line = orderLineAt(i);
    batch.push({ topic: config.topics.orders, key: line.location, value: JSON.stringify(line) });
    if (batch.length === 2_000) {
      await producer.send(batch);
      batch = [];
    }
  }
  if (batch.length > 0) await producer.send(batch);
  await producer.close();
}

async function kafkajsRawRate(port: KafkaPort, topic: string): Promise<number> {
  const consumer = port.consumer({ groupId: `bench-raw-${randomUUID()}`, topics: [topic], fromBeginning: true, sessionTimeoutMs: 10_000, heartbeatIntervalMs: 1_000, partitionsConsumedConcurrently: PARTITIONS, maxWaitTimeMs: 100 });
  let seen = 0;
  let first = 0;
  await new Promise<void>((resolve, reject) => {
    void consumer
      .run({
        onAssignment: () => undefined,
        onCrash: reject,
        eachBatch: async (batch, ctx) => {
          if (first === 0) first = performance.now();
          seen += batch.messages.length;
          ctx.resolve(batch.lastOffset);
          if (seen >= RECORDS) resolve();
        },
      })
      .catch(reject);
  });
  const ms = performance.now() - first;
  await consumer.stop();
  return ms;
}

const txStats: Record<string, { count: number; messages: number; bytes: number; ms: number; beginMs: number; sendMs: number; offsetsMs: number; commitMs: number }> = {};

/** Counts and times every transaction (begin to commit) per stage, to show where the time goes. */
function timedPort(port: KafkaPort): KafkaPort {
  return {
    ...port,
    transactionalProducer(id) {
      const producer = port.transactionalProducer(id);
      const stage = id.includes('-ingest.') ? 'ingest' : 'sensing';
      return {
        transactionalId: producer.transactionalId,
        init: () => producer.init(),
        close: () => producer.close(),
        async begin() {
          const started = performance.now();
          const tx = await producer.begin();
          const s = (txStats[stage] ??= { count: 0, messages: 0, bytes: 0, ms: 0, beginMs: 0, sendMs: 0, offsetsMs: 0, commitMs: 0 });
          s.beginMs += performance.now() - started;
          return {
            async send(messages) {
              const t = performance.now();
              s.messages += messages.length;
              for (const m of messages) s.bytes += (m.value?.length ?? 0) + m.key.length;
              try {
                return await tx.send(messages);
              } finally {
                s.sendMs += performance.now() - t;
              }
            },
            async sendOffsets(g, o) {
              const t = performance.now();
              await tx.sendOffsets(g, o);
              s.offsetsMs += performance.now() - t;
            },
            async commit() {
              const t = performance.now();
              await tx.commit();
              s.commitMs += performance.now() - t;
              s.count++;
              s.ms += performance.now() - started;
            },
            abort: () => tx.abort(),
          };
        },
      };
    },
  };
}

/** The ingest stage's CPU share: the same records through ingest() and the event-log encoding, without Kafka. */
function validationAlone(): number {
  const validator = new RecordValidator();
  const values = Array.from({ length: RECORDS }, (_, i) => JSON.stringify(orderLineAt(i)));
  const t = performance.now();
  for (let i = 0; i < values.length; i++) {
    const r = ingest({ type: 'order-line', value: values[i]!, source: { kind: 'topic', topic: 'bench', partition: 0, offset: String(i) }, arrivalMs: 0 }, validator);
    if (r.ok) encodeEventLogRecord(r.record);
  }
  return performance.now() - t;
}

// Order times near the run's own clock: the sensing stage refuses lines more than its lookback behind the
// location's event time (which arrival advances), so fixed dates would measure the dead-letter path only.
const ORDERED_MS = Date.now() - 3_600_000;
const ORDERED_AT = new Date(ORDERED_MS).toISOString();
const REQUESTED_DATE = new Date(ORDERED_MS + 3 * 86_400_000).toISOString().slice(0, 10);

function orderLineAt(i: number) {
  return {
    eventId: `ev-${i}`,
    orderId: `SO-${i}`,
    lineId: '1',
    revision: 1,
    op: 'upsert',
    location: `DC-${String((i % LOCATIONS) + 1).padStart(4, '0')}`,
    item: `ITEM-${(i * 7) % ITEMS}`,
    quantity: 1 + (i % 50),
    orderedAt: ORDERED_AT,
    requestedDate: REQUESTED_DATE,
  };
}

function kcatRaw(brokers: string, topic: string): number | undefined {
  if (spawnSync('kcat', ['-V']).status !== 0) return undefined;
  const t = performance.now();
  const out = execFileSync('kcat', ['-C', '-b', brokers, '-t', topic, '-o', 'beginning', '-e', '-q', '-f', '%o\n'], { maxBuffer: 1 << 28 });
  const ms = performance.now() - t;
  const lines = out.toString().split('\n').filter(Boolean).length;
  if (lines !== RECORDS) console.warn(`kcat read ${lines} records, expected ${RECORDS}`);
  return ms;
}

await main();
process.exit(0);
