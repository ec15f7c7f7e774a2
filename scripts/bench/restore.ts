// Benchmark: restore of the sensing state from the changelog topic over Kafka (issue target: 100k series in under
// 60 s). Builds one location's state of N series from a 13-week history (not timed), writes its changelog to a real
// changelog topic as the sensing stage does (split under the message size limit, in transactions), then starts a
// fresh sensing stage on that partition and times its restore: the barrier write, the fetch, the decode and the
// apply, as the partition's own log line reports them. The restored state is checked against the original by the
// plans both compute for the same day: a seeded sample compared record by record and a digest of all of them.
//
//   node --import tsx scripts/bench/restore.ts   (BENCH_SERIES=5000 BENCH_SEED_SERIES=200 BENCH_SEED=1 BENCH_COPIES=1)
// The default size keeps a run to a few minutes on two cores (building a 13-week history is most of it).
// BENCH_COPIES=k builds BENCH_SERIES/k series and writes each one's changelog entries k times under k item names:
// the generated history of 100k series does not fit in memory, its state does. The restored state is then checked
// against a restore of the same entries in memory (snapshot digests) instead of against the built model's plans.
// BENCH_SEED_SERIES is how many series are compared one by one (picked with BENCH_SEED). Uses KAFKA_BROKERS when
// set, else starts a throw-away local broker (scripts/kafka-local). Exits 1 when the restored plans differ.
import { createHash } from 'node:crypto';
import type { Plan } from '../../src/contracts/plan.ts';
import { createCoreModels } from '../../src/runtime/core-location-model.ts';
import type { LocationModel, LocationModelFactory, SenseAsOf } from '../../src/runtime/location-model-port.ts';
import { createSensingStage } from '../../src/runtime/sensing-stage.ts';
import { createRng, sampleInteger } from '../../src/stats/random.ts';
import { encodeChangelog } from '../../src/transport/kafka/changelog-codec.ts';
import type { ChangelogEntry } from '../../src/runtime/stage-output.ts';
import type { OutgoingMessage } from '../../src/transport/kafka/kafka-port.ts';
import { maxValueBytes } from '../../src/transport/kafka/message-chunks.ts';
import { NO_CRASH_POINTS } from '../../src/transport/kafka/crash-points.ts';
import { serveKafka } from '../../src/transport/kafka/serve-kafka.ts';
import { runTransaction } from '../../src/transport/kafka/transaction-runner.ts';
import { openBenchKafka, perSecond, sleep } from './bench-kafka.ts';
import { benchChangelog, buildBenchLocation, type BenchLocation } from './bench-state.ts';

const SERIES = Number(process.env.BENCH_SERIES ?? 5_000);
const SAMPLE = Number(process.env.BENCH_SEED_SERIES ?? 200);
const SEED = Number(process.env.BENCH_SEED ?? 1);
const COPIES = Math.max(1, Math.floor(Number(process.env.BENCH_COPIES ?? 1)));
const TARGET_SERIES = 100_000;
const TARGET_MS = 60_000;
/** Changelog records per transaction while writing the state (a running stage writes one per batch). */
const TX_MESSAGES = 2_000;

interface RestoreLine {
  partition: number;
  changelogRecords: number;
  keys: number;
  bytes: number;
  ms: number;
  barrierMs: number;
  fetchMs: number;
  decodeMs: number;
  applyMs: number;
}

/** The service's log lines: the restore's own figures are picked out, warnings and errors go on to stderr. */
const restoreLines: RestoreLine[] = [];
const logSink = {
  write(line: string): boolean {
    const entry = JSON.parse(line) as { level: number; msg?: string } & Partial<RestoreLine>;
    if (entry.msg === 'partition restored') restoreLines.push(entry as RestoreLine);
    if (entry.level >= 40) process.stderr.write(line);
    return true;
  },
} as unknown as NodeJS.WritableStream;

async function main(): Promise<number> {
  const kafka = await openBenchKafka({ partitions: 1, logLevel: 'info', logTo: logSink });
  const { config, logger, port } = kafka;
  try {
    console.log(`nearcast restore benchmark: ${SERIES} series in one location, changelog over Kafka (2-core machine shared with other work: figures are noisy)`);
    const models = createCoreModels({ demandBasis: 'orders' });
    let built: BenchLocation | undefined = await buildBenchLocation(Math.ceil(SERIES / COPIES), models);
    console.log(`state: ${built.facts} records applied in ${Math.round(built.applyMs)} ms (history generated in ${Math.round(built.generateMs)} ms; not timed)`);
    const asOf: SenseAsOf = { planDate: built.day, knowledgeMs: built.lastFact.arrivalMs + 1 };
    const original = COPIES === 1 ? plansOf(built.model, asOf) : undefined;
    const entries = copiesOf(benchChangelog(built), built.master.location, COPIES);
    if (COPIES > 1) console.log(`changelog entries of ${Math.ceil(SERIES / COPIES)} built series written ${COPIES} times under other item names`);

    // The original model is dropped once its changelog exists: a restore starts from nothing but the topic.
    const t0 = performance.now();
    let messages: OutgoingMessage[] | undefined = encodeChangelog(
      entries,
      { topic: config.topics.changelog, partition: 0, generation: 'bench-build', maxValueBytes: maxValueBytes(config.kafka.maxMessageBytes) },
      new Map(),
    ).messages;
    built = undefined;
    const count = messages.length;
    const writtenBytes = messages.reduce((t, m) => t + Buffer.byteLength(m.key) + (m.value === null ? 0 : Buffer.byteLength(m.value)), 0);
    const producer = port.transactionalProducer(`${config.kafka.groupId}-bench-writer`);
    await producer.init();
    for (let i = 0; i < messages.length; i += TX_MESSAGES) {
      await runTransaction(producer, { messages: messages.slice(i, i + TX_MESSAGES) }, { maxMessageBytes: config.kafka.maxMessageBytes, crash: NO_CRASH_POINTS });
    }
    await producer.close();
    messages = undefined;
    console.log(`changelog written: ${count} records, ${(writtenBytes / 1e6).toFixed(1)} MB in ${Math.round(performance.now() - t0)} ms (not timed)`);

    const restored: LocationModel[] = [];
    const capturing: LocationModelFactory = {
      ...models,
      restoreParts(base, parts) {
        const m = models.restoreParts!(base, parts);
        restored.push(m);
        return m;
      },
    };
    const cpu0 = process.cpuUsage();
    const t1 = performance.now();
    // No live clock: a deadline close written after the restore would change the state this bench compares.
    const service = await serveKafka(config, logger, {
      stages: ['sensing'],
      createStage: (partition) => createSensingStage({ partition, models: capturing, settings: { demandBasis: 'orders' } }),
      handleSignals: false,
      setUpTopics: false,
      port,
      clock: false,
    });
    while ((service.sensing?.readyPartitions().length ?? 0) < 1) await sleep(10);
    const wallMs = performance.now() - t1;
    const cpu = process.cpuUsage(cpu0);
    await service.stop();

    const line = restoreLines.find((l) => l.partition === 0);
    if (!line) throw new Error('the sensing partition logged no "partition restored" line');
    console.log(`restore of partition 0: ${line.ms} ms in the partition (barrier ${line.barrierMs} ms, fetch ${line.fetchMs} ms, decode ${line.decodeMs} ms, apply ${line.applyMs} ms)`);
    console.log(`  ${line.changelogRecords} changelog records, ${line.keys} keys, ${(line.bytes / 1e6).toFixed(1)} MB read; ${Math.round(wallMs)} ms from serveKafka() to ready (group joins included)`);
    console.log(`  process CPU during it: ${Math.round((cpu.user + cpu.system) / 1000)} ms (GC threads count too)`);
    const seriesPerSecond = perSecond(SERIES, line.ms);
    const projectedMs = (line.ms / SERIES) * TARGET_SERIES;
    console.log(`series/s: ${seriesPerSecond}; changelog bytes per series: ${Math.round(line.bytes / SERIES)}`);
    console.log(
      `projection to ${TARGET_SERIES} series (linear in the series): ${(projectedMs / 1000).toFixed(1)} s (target < ${TARGET_MS / 1000} s), ${((line.bytes / SERIES) * TARGET_SERIES / 1e6).toFixed(0)} MB of changelog`,
    );

    if (restored.length !== 1) throw new Error(`expected one restored location, got ${restored.length}`);
    if (original) return compare(original, plansOf(restored[0]!, asOf));
    const overKafka = snapshotDigest(restored.pop()!);
    const inMemory = createSensingStage({ partition: 0, models: capturing, settings: { demandBasis: 'orders' } });
    inMemory.restore(entries);
    const reference = snapshotDigest(restored.pop()!);
    const same = overKafka.digest === reference.digest && overKafka.series === SERIES;
    console.log(
      `restored over Kafka vs restored in memory from the same entries: ${overKafka.series} and ${reference.series} series, snapshots ${same ? 'identical' : 'DIFFER'} (sha-256 ${overKafka.digest.slice(0, 12)} vs ${reference.digest.slice(0, 12)})`,
    );
    return same ? 0 : 1;
  } finally {
    await kafka.close();
  }
}

/** The entries with every per-series part written `copies` times, copy k > 0 under the item name `<item>.c<k>`. */
function copiesOf(entries: ChangelogEntry[], location: string, copies: number): ChangelogEntry[] {
  if (copies === 1) return entries;
  const out: ChangelogEntry[] = [];
  const prefix = `${location}|`;
  for (const e of entries) {
    out.push(e);
    if (!e.key.startsWith(prefix)) continue;
    const part = e.key.slice(prefix.length);
    const colon = part.indexOf(':');
    const item = part.slice(colon + 1);
    for (let k = 1; k < copies; k++) {
      const name = `${item}.c${k}`;
      // Item names appear in a part's value only as JSON strings (the series' own name).
      out.push({ key: `${prefix}${part.slice(0, colon + 1)}${name}`, value: e.value === null ? null : e.value.replaceAll(JSON.stringify(item), JSON.stringify(name)) });
    }
  }
  return out;
}

/** A digest of a model's whole snapshot, series by series (the snapshot of 100k series is too long for one string). */
function snapshotDigest(model: LocationModel): { digest: string; series: number } {
  const snap = model.snapshot() as { sensing: { series: unknown[] } & Record<string, unknown> } & Record<string, unknown>;
  const hash = createHash('sha256');
  const { series, ...sensingRest } = snap.sensing;
  const { sensing: _sensing, ...rest } = snap;
  hash.update(JSON.stringify(rest));
  hash.update(JSON.stringify(sensingRest));
  for (const s of series) hash.update(JSON.stringify(s));
  return { digest: hash.digest('hex'), series: series.length };
}

interface PlanSet {
  readonly byItem: Map<string, string>;
  readonly digest: string;
}

function plansOf(model: LocationModel, asOf: SenseAsOf): PlanSet {
  const hash = createHash('sha256');
  const byItem = new Map<string, string>();
  for (const p of model.sense(asOf).plans as readonly Plan[]) {
    const text = JSON.stringify(p);
    hash.update(text);
    byItem.set(p.item, text);
  }
  return { byItem, digest: hash.digest('hex') };
}

function compare(original: PlanSet, restored: PlanSet): number {
  const items = [...original.byItem.keys()];
  const rng = createRng(SEED);
  const sample = new Set<string>();
  while (sample.size < Math.min(SAMPLE, items.length)) sample.add(items[sampleInteger(rng, 0, items.length - 1)]!);
  const differing = [...sample].filter((item) => restored.byItem.get(item) !== original.byItem.get(item));
  const sameAll = original.digest === restored.digest && original.byItem.size === restored.byItem.size;
  console.log(
    `restored vs original plans: ${sample.size - differing.length} of ${sample.size} sampled series identical (seed ${SEED}); all ${original.byItem.size} plans ${sameAll ? 'identical' : 'DIFFER'} (sha-256 ${original.digest.slice(0, 12)} vs ${restored.digest.slice(0, 12)})`,
  );
  if (differing.length === 0 && sameAll) return 0;
  if (differing.length > 0) console.error(`FAILED: series ${differing.slice(0, 5).join(', ')} differ after the restore`);
  else console.error('FAILED: the plans differ after the restore (outside the sample)');
  return 1;
}

process.exit(await main());
