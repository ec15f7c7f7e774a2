// Benchmark: end-to-end ingest rate over Kafka (input topic → ingest stage → event log → sensing stage → applied
// state, transactions on), next to two raw consume rates of the same input topic in the same run — kafkajs with no
// processing, and kcat (librdkafka) — with both ratios; then the restore time of the sensing state from the
// changelog. Where the time goes is split into the stage's apply (state + snapshots) and the rest (Kafka I/O,
// parse, validation, transactions).
//
// The location master records are ingested first, in a service run of their own that ends only once the sensing
// stage has committed all of them; the order lines are produced after that, so none of them can meet a sensing
// stage that does not know its location yet. Every dead letter is counted at the end: a run that wrote any exits 1,
// since its rate would partly measure rejects.
//
//   node --import tsx scripts/bench/kafka-ingest.ts   (BENCH_RECORDS=50000 BENCH_LOCATIONS=50 BENCH_MODELS=core|tally)
// Uses KAFKA_BROKERS when set, else starts a throw-away local broker (scripts/kafka-local).

import { randomUUID } from 'node:crypto';
import type { Config } from '../../src/config/config.ts';
import { RecordValidator } from '../../src/contracts/validate.ts';
import { encodeEventLogRecord } from '../../src/runtime/event-log-record.ts';
import { ingest } from '../../src/runtime/ingest-stage.ts';
import { createSensingStage } from '../../src/runtime/sensing-stage.ts';
import type { SensingStage } from '../../src/runtime/sensing-stage-port.ts';
import type { KafkaPort, OutgoingMessage } from '../../src/transport/kafka/kafka-port.ts';
import { kafkaGroupIds, serveKafka, type KafkaService } from '../../src/transport/kafka/serve-kafka.ts';
import { createCoreModels } from '../../src/runtime/core-location-model.ts';
import { tallyModels } from '../../test/integration/kafka-transport/helpers/tally-models.ts';
import { BenchTrace } from './bench-trace.ts';
import { hasKcat, kcatRead, openBenchKafka, perSecond as rate, sleep } from './bench-kafka.ts';

const RECORDS = Number(process.env.BENCH_RECORDS ?? 50_000);
const LOCATIONS = Number(process.env.BENCH_LOCATIONS ?? 50);
const ITEMS = Number(process.env.BENCH_ITEMS ?? 40);
const PARTITIONS = Number(process.env.BENCH_PARTITIONS ?? 6);
/** `core` = the real sensing and monitoring engine; `tally` = a trivial sum per item, to see the transport's own cost. */
const MODELS = process.env.BENCH_MODELS === 'tally' ? 'tally' : 'core';
/** A phase that makes no progress for this long fails the run instead of waiting forever. */
const STALL_MS = 120_000;

/** What the sensing stages did, counted once their batch's transaction committed. */
const sensed = { applyMs: 0, orderLines: 0, deadLetters: 0, firstOrderLineCommitMs: 0, lastOrderLineCommitMs: 0 };
/** Locations each partition's committed (or restored) state holds. */
const committedLocations = new Map<number, number>();
/** BENCH_TRACE=1 (or a file name) prints the end-to-end phase's timeline. */
const trace = new BenchTrace(Boolean(process.env.BENCH_TRACE));

async function main(): Promise<number> {
  const kafka = await openBenchKafka({ partitions: PARTITIONS });
  const { brokers, config, logger } = kafka;
  const port = trace.wrap(timedPort(kafka.port, config.topics.deadLetter));
  try {
    console.log(`nearcast Kafka ingest benchmark: ${RECORDS} order lines, ${LOCATIONS} locations × ${ITEMS} items, ${PARTITIONS} partitions, ${MODELS} models`);
    console.log('  (2-core machine shared with other work: wall-clock figures are noisy; CPU time is steadier)');
    const serve = (stageNames?: ('ingest' | 'sensing')[]) =>
      serveKafka(config, logger, { ...(stageNames ? { stages: stageNames } : {}), createStage: timedStage, handleSignals: false, setUpTopics: false, port });

    // 1. Master data alone, until the sensing stage has committed every location.
    const masters = await serve();
    await produce(port, locationMessages(config));
    await until('the sensing stage to commit all locations', () => knownLocations() >= LOCATIONS, () => knownLocations());
    await masters.stop();
    console.log(`locations known to the sensing stage: ${knownLocations()} of ${LOCATIONS} (committed before any order line was produced)`);

    // 2. The order lines, as a backlog in the input topic (the raw rates and the service read the same backlog).
    await produce(port, orderMessages(config));
    const raw = await kafkajsRawRate(port, config.topics.orders);
    const kcat = hasKcat() ? kcatRead(brokers, config.topics.orders, '%o\n') : undefined;
    if (kcat && kcat.lines.length !== RECORDS) console.warn(`kcat read ${kcat.lines.length} records, expected ${RECORDS}`);

    // 3. End to end over that backlog.
    resetTxStats();
    Object.assign(sensed, { applyMs: 0, orderLines: 0, deadLetters: 0, firstOrderLineCommitMs: 0, lastOrderLineCommitMs: 0 });
    trace.reset();
    const started = performance.now();
    const cpuStarted = process.cpuUsage();
    const service: KafkaService = await serve();
    const handled = () => sensed.orderLines + txDeadLetters('ingest');
    await until('every order line to be committed by the sensing stage or dead-lettered by the ingest stage', () => handled() >= RECORDS, handled);
    const e2eMs = sensed.lastOrderLineCommitMs - started;
    const e2eCpu = process.cpuUsage(cpuStarted);
    trace.end();
    await service.stop();
    trace.print();

    const restoreStarted = performance.now();
    const again = await serveKafka(config, logger, { stages: ['sensing'], createStage: timedStage, handleSignals: false, setUpTopics: false, port });
    while ((again.sensing?.readyPartitions().length ?? 0) < PARTITIONS) await sleep(20);
    const restoreMs = performance.now() - restoreStarted;
    await again.stop();

    const validationMs = validationAlone();
    const e2e = rate(RECORDS, e2eMs);
    const rawRate = rate(RECORDS, raw.ms);
    console.log(`kafkajs raw consume      ${rawRate.toString().padStart(9)} records/s  (${Math.round(raw.ms)} ms from consumer.run() — group join and first fetch included — to the last record; first batch after ${Math.round(raw.firstBatchMs)} ms)`);
    if (kcat) console.log(`kcat raw consume         ${rate(RECORDS, kcat.ms).toString().padStart(9)} records/s  (${Math.round(kcat.ms)} ms, whole kcat process: connect, read to the end, exit)`);
    else console.log('kcat raw consume         not measured: kcat is not installed (apt-get install -y kcat)');
    console.log(
      `end to end (tx on)       ${e2e.toString().padStart(9)} records/s  (${Math.round(e2eMs)} ms from serveKafka() — group joins and restore of the locations included — to the commit of the last order line)`,
    );
    const steadyMs = sensed.lastOrderLineCommitMs - sensed.firstOrderLineCommitMs;
    console.log(`  from the first to the last committed order-line batch: ${Math.round(steadyMs)} ms`);
    console.log(`  of which stage apply   ${Math.round(sensed.applyMs)} ms of ${Math.round(e2eMs)} ms (state + snapshots); Kafka, parse, validation, transactions: ${Math.round(e2eMs - sensed.applyMs)} ms`);
    // Wall time swings with the broker and whatever else shares the machine; this process's CPU time is steadier.
    console.log(`  nearcast process CPU during it: ${Math.round((e2eCpu.user + e2eCpu.system) / 1000)} ms (the rest of the wall time is waiting on the broker)`);
    console.log(`  ingest parse + validation + event-log encoding alone, in memory: ${Math.round(validationMs)} ms for ${RECORDS} lines`);
    for (const [stage, t] of Object.entries(txStats)) {
      console.log(`  ${stage} transactions: ${t.count}, ${t.messages} messages, ${(t.bytes / 1_048_576).toFixed(1)} MiB, ${Math.round(t.ms)} ms open in total`);
      console.log(`    of which begin ${Math.round(t.beginMs)} ms, sends ${Math.round(t.sendMs)} ms, offsets ${Math.round(t.offsetsMs)} ms, commit ${Math.round(t.commitMs)} ms`);
    }
    console.log(`ratio end to end / kafkajs raw   ${(e2e / rawRate).toFixed(2)}  (target ≥ 0.5)`);
    if (kcat) console.log(`ratio end to end / kcat raw      ${(e2e / rate(RECORDS, kcat.ms)).toFixed(2)}`);
    console.log(`restore of ${PARTITIONS} partitions (${LOCATIONS} locations) from the changelog: ${Math.round(restoreMs)} ms (incl. group join)`);
    console.log(`groups: ${JSON.stringify(kafkaGroupIds(config))}`);
    return reportDeadLetters(brokers, config);
  } finally {
    await kafka.close();
  }
}

/** Dead letters as the topic holds them (committed only), by code; any at all fails the run. */
function reportDeadLetters(brokers: string, config: Config): number {
  const inProcess = txDeadLetters('ingest') + txDeadLetters('sensing');
  if (!hasKcat()) {
    console.log(`dead letters (counted in committed transactions; kcat not installed to read the topic): ${inProcess}`);
    return inProcess > 0 ? 1 : 0;
  }
  const { lines } = kcatRead(brokers, config.topics.deadLetter, '%s\n');
  const byCode = new Map<string, number>();
  for (const line of lines) {
    let code = 'unreadable';
    try {
      code = String((JSON.parse(line) as { code?: unknown }).code ?? 'no code');
    } catch {
      // counted as unreadable
    }
    byCode.set(code, (byCode.get(code) ?? 0) + 1);
  }
  console.log(`dead letters in ${config.topics.deadLetter}: ${lines.length}${lines.length > 0 ? ` ${JSON.stringify(Object.fromEntries(byCode))}` : ''} (counted in committed transactions: ${inProcess})`);
  if (lines.length > 0 || inProcess > 0) {
    console.error('FAILED: the run wrote dead letters, so its rate partly measures rejects');
    return 1;
  }
  return 0;
}

async function until(what: string, done: () => boolean, progress: () => number): Promise<void> {
  let last = progress();
  let lastChange = performance.now();
  while (!done()) {
    await sleep(20);
    const now = progress();
    if (now !== last) [last, lastChange] = [now, performance.now()];
    if (performance.now() - lastChange > STALL_MS) throw new Error(`gave up waiting for ${what}: no progress for ${STALL_MS / 1000} s (at ${now})`);
  }
}

function knownLocations(): number {
  let n = 0;
  for (const count of committedLocations.values()) n += count;
  return n;
}

/** The sensing stage with its apply timed and its results counted on commit (a batch aborted counts nothing). */
function timedStage(partition: number): SensingStage {
  const stage = createSensingStage({ partition, models: MODELS === 'tally' ? tallyModels : createCoreModels({ demandBasis: 'orders' }), settings: { demandBasis: 'orders' } });
  let pending = { ms: 0, orderLines: 0, deadLetters: 0 };
  return {
    partition: stage.partition,
    nextOffset: () => stage.nextOffset(),
    locations: () => stage.locations(),
    commit() {
      stage.commit();
      committedLocations.set(partition, stage.locations().length);
      sensed.applyMs += pending.ms;
      sensed.deadLetters += pending.deadLetters;
      if (pending.orderLines > 0) {
        sensed.orderLines += pending.orderLines;
        sensed.lastOrderLineCommitMs = performance.now();
        if (!sensed.firstOrderLineCommitMs) trace.mark(`sensing stage ${partition}`, 'first order-line batch committed');
        sensed.firstOrderLineCommitMs ||= sensed.lastOrderLineCommitMs;
      }
      pending = { ms: 0, orderLines: 0, deadLetters: 0 };
    },
    abort() {
      pending = { ms: 0, orderLines: 0, deadLetters: 0 };
      stage.abort();
    },
    restore(entries) {
      stage.restore(entries);
      committedLocations.set(partition, stage.locations().length);
    },
    apply(batch) {
      const t = performance.now();
      const r = stage.apply(batch);
      pending.ms += performance.now() - t;
      const next = BigInt(stage.nextOffset());
      // Entries below the applied offset are skipped by the stage (re-delivery); count only what it applied.
      pending.orderLines += batch.filter((e) => e.record.kind === 'order-line' && BigInt(e.offset) < next).length;
      pending.deadLetters += r.outputs.filter((o) => o.topic === 'deadLetter').length;
      return r;
    },
  };
}

function locationMessages(config: Config): OutgoingMessage[] {
  return Array.from({ length: LOCATIONS }, (_, i) => {
    const l = locationAt(i);
    return { topic: config.topics.locations, key: l, value: JSON.stringify({ location: l, timeZone: 'Europe/Berlin' }) };
  });
}

function* orderMessages(config: Config): Generator<OutgoingMessage> {
  for (let i = 0; i < RECORDS; i++) {
    const line = orderLineAt(i);
    yield { topic: config.topics.orders, key: line.location, value: JSON.stringify(line) };
  }
}

async function produce(port: KafkaPort, messages: Iterable<OutgoingMessage>): Promise<void> {
  const producer = await port.producer();
  try {
    let batch: OutgoingMessage[] = [];
    for (const m of messages) {
      batch.push(m);
      if (batch.length === 2_000) {
        await producer.send(batch);
        batch = [];
      }
    }
    if (batch.length > 0) await producer.send(batch);
  } finally {
    await producer.close();
  }
}

/** Timed from just before the consumer joins its group and fetches, to the moment the last record arrived. */
async function kafkajsRawRate(port: KafkaPort, topic: string): Promise<{ ms: number; firstBatchMs: number }> {
  const consumer = port.consumer({ groupId: `bench-raw-${randomUUID()}`, topics: [topic], fromBeginning: true, sessionTimeoutMs: 10_000, heartbeatIntervalMs: 1_000, partitionsConsumedConcurrently: PARTITIONS, maxWaitTimeMs: 100 });
  let seen = 0;
  let first = 0;
  let last = 0;
  const started = performance.now();
  await new Promise<void>((resolve, reject) => {
    void consumer
      .run({
        onAssignment: () => undefined,
        onCrash: reject,
        eachBatch: async (batch, ctx) => {
          first ||= performance.now();
          seen += batch.messages.length;
          ctx.resolve(batch.lastOffset);
          if (seen >= RECORDS) {
            last ||= performance.now();
            resolve();
          }
        },
      })
      .catch(reject);
  });
  await consumer.stop();
  return { ms: last - started, firstBatchMs: first - started };
}

interface TxStats {
  count: number;
  messages: number;
  bytes: number;
  deadLetters: number;
  ms: number;
  beginMs: number;
  sendMs: number;
  offsetsMs: number;
  commitMs: number;
}
let txStats: Record<string, TxStats> = {};
const resetTxStats = () => (txStats = {});
const txDeadLetters = (stage: string) => txStats[stage]?.deadLetters ?? 0;

/** Counts and times every transaction (begin to commit) per stage, to show where the time goes. */
function timedPort(port: KafkaPort, deadLetterTopic: string): KafkaPort {
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
          const s = (txStats[stage] ??= { count: 0, messages: 0, bytes: 0, deadLetters: 0, ms: 0, beginMs: 0, sendMs: 0, offsetsMs: 0, commitMs: 0 });
          s.beginMs += performance.now() - started;
          let deadLetters = 0;
          return {
            async send(messages) {
              const t = performance.now();
              s.messages += messages.length;
              for (const m of messages) {
                s.bytes += (m.value?.length ?? 0) + m.key.length;
                if (m.topic === deadLetterTopic) deadLetters++;
              }
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
              s.deadLetters += deadLetters;
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

const locationAt = (i: number) => `DC-${String(i + 1).padStart(4, '0')}`;

function orderLineAt(i: number) {
  return {
    eventId: `ev-${i}`,
    orderId: `SO-${i}`,
    lineId: '1',
    revision: 1,
    op: 'upsert',
    location: locationAt(i % LOCATIONS),
    item: `ITEM-${(i * 7) % ITEMS}`,
    quantity: 1 + (i % 50),
    orderedAt: ORDERED_AT,
    requestedDate: REQUESTED_DATE,
  };
}

process.exit(await main());
