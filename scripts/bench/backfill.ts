// Benchmark: a 13-week backfill of 100k series (issue 5 target: under 30 minutes), replayed in event time through
// the runtime's sensing stage by `nearcast backtest` (the embedded path: the same stage, day closes, plans,
// monitoring and accuracy as a Kafka deployment, without the broker's transactions and changelog, which the
// `kafka-ingest`, `close` and `restore` benches measure).
//
// The history of 100k series does not fit in memory as generated objects, so each centre's history is generated
// and written on its own, and the centres' files are then merged line by line by arrival (DESIGN section 3: each
// file lists records in the order they arrived; the merged file keeps every record's arrival time).
//
//   node --max-old-space-size=16000 --import tsx scripts/bench/backfill.ts   (BENCH_SERIES=100000 BENCH_CENTRES=10)
// BENCH_KEEP_PLANS=1 keeps plans.ndjson (tens of gigabytes at 100k series); by default the plans are written and
// then removed with the rest of the output. BENCH_INPUT=dir keeps the merged history there and reuses it on the next
// run of the same size (generating 100k series takes about 20 minutes).
import { closeSync, existsSync, mkdirSync, mkdtempSync, openSync, readFileSync, rmSync, statSync, writeFileSync, writeSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { generateHistory } from '../../src/demo/generate-history.ts';
import { writeHistory } from '../../src/demo/write-history.ts';
import { runBacktest } from '../../src/runtime/backtest/run-backtest.ts';
import { createCoreModels } from '../../src/runtime/core-location-model.ts';
import { readLines } from '../../src/runtime/history/line-reader.ts';
import type { LocationModel, LocationModelFactory } from '../../src/runtime/location-model-port.ts';
import { PerformanceObserver } from 'node:perf_hooks';
import { benchCatalogue, benchScenario } from './bench-history.ts';

const series = Number(process.env.BENCH_SERIES ?? 100_000);
const centres = Number(process.env.BENCH_CENTRES ?? 10);
const weeks = 13;
const itemsPerCentre = Math.round(series / centres);
const root = mkdtempSync(path.join(tmpdir(), 'nc-bench-backfill-'));
const seconds = (from: number) => ((performance.now() - from) / 1000).toFixed(1);

/** When a history line's record became known (the arrival rule's knowledge time; day closes: their date). */
function knownAt(kind: string, text: string): number | string {
  const r = JSON.parse(text) as Record<string, string>;
  if (kind === 'orders') return Date.parse(r.changedAt ?? r.orderedAt!);
  if (kind === 'shipments') return Date.parse(r.shippedAt!);
  if (kind === 'baselines') return Date.parse(r.publishedAt!);
  return r.date!;
}

/** Merges the centres' files of one kind by arrival (ties: the lower centre first), streaming. */
async function mergeKind(kind: string, dirs: readonly string[], out: string): Promise<number> {
  const sources = dirs.map((d) => readLines(path.join(d, `${kind}.ndjson`))[Symbol.asyncIterator]());
  type Head = { text: string; arrival: number | string };
  const latest: (number | string)[] = dirs.map(() => -Infinity);
  const next = async (k: number): Promise<Head | undefined> => {
    for (;;) {
      const r = await sources[k]!.next();
      if (r.done) return undefined;
      if (r.value.text.trim() === '') continue;
      const t = knownAt(kind, r.value.text);
      // Arrival rule within the file: a record listed after later ones arrived with the latest of them.
      const arrival = latest[k]! > t ? latest[k]! : t;
      latest[k] = arrival;
      return { text: r.value.text, arrival };
    }
  };
  const heads = await Promise.all(dirs.map((_, k) => next(k)));
  const fd = openSync(out, 'w');
  let buffer: string[] = [];
  let bytes = 0;
  let lines = 0;
  for (;;) {
    let best = -1;
    for (let k = 0; k < heads.length; k++) if (heads[k] && (best < 0 || heads[k]!.arrival < heads[best]!.arrival)) best = k;
    if (best < 0) break;
    buffer.push(heads[best]!.text);
    bytes += heads[best]!.text.length;
    lines++;
    if (bytes > 4 << 20) {
      writeSync(fd, `${buffer.join('\n')}\n`);
      buffer = [];
      bytes = 0;
    }
    heads[best] = await next(best);
  }
  if (buffer.length > 0) writeSync(fd, `${buffer.join('\n')}\n`);
  closeSync(fd);
  return lines;
}

/** Where the replay's time goes: the model's own calls, timed (the rest is reading, parsing, validation, the
 * stage's bookkeeping and writing the output files). */
const spent = { apply: 0, sense: 0, published: 0, closeDay: 0, applies: 0, closes: 0, gc: 0 };
function timed(models: LocationModelFactory): LocationModelFactory {
  const wrap = (m: LocationModel): LocationModel => {
    const time = <A extends unknown[], R>(key: 'apply' | 'sense' | 'published' | 'closeDay', f: (...a: A) => R) => (...a: A): R => {
      const t = performance.now();
      try {
        return f(...a);
      } finally {
        spent[key] += performance.now() - t;
      }
    };
    return Object.assign(Object.create(m) as LocationModel, {
      apply: time('apply', (r: Parameters<LocationModel['apply']>[0]) => (spent.applies++, m.apply(r))),
      sense: time('sense', (a: Parameters<LocationModel['sense']>[0]) => m.sense(a)),
      published: time('published', (...a: Parameters<LocationModel['published']>) => m.published(...a)),
      closeDay: time('closeDay', (...a: Parameters<LocationModel['closeDay']>) => (spent.closes++, m.closeDay(...a))),
    });
  };
  return { ...models, create: (l) => wrap(models.create(l)), restore: (s) => wrap(models.restore(s)) };
}

/** Generates the history centre by centre and merges it into `input`; prints what it made. */
async function generate(input: string, scenario: ReturnType<typeof benchScenario>): Promise<void> {
  const t0 = performance.now();
  const catalogue = benchCatalogue({ centres, itemsPerCentre, weeks });
  const dirs: string[] = [];
  const locations: unknown[] = [];
  for (const [k, centre] of catalogue.centres.entries()) {
    const dir = path.join(root, `centre-${k}`);
    const history = generateHistory(scenario, { centres: [centre], items: catalogue.items });
    writeHistory(dir, history);
    locations.push(...history.locations);
    dirs.push(dir);
  }
  const t1 = performance.now();
  mkdirSync(input, { recursive: true });
  writeFileSync(path.join(input, 'locations.json'), `${JSON.stringify(locations, null, 2)}\n`);
  const counts: Record<string, number> = {};
  for (const kind of ['baselines', 'orders', 'shipments', 'day-closes']) counts[kind] = await mergeKind(kind, dirs, path.join(input, `${kind}.ndjson`));
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
  const records = counts.orders! + counts.shipments! + counts.baselines!;
  const inputBytes = ['baselines', 'orders', 'shipments', 'day-closes'].reduce((a, k) => a + statSync(path.join(input, `${k}.ndjson`)).size, 0);
  console.log(
    `history: ${centres} centres × ${itemsPerCentre} items = ${centres * itemsPerCentre} series, ${weeks} weeks, ${records} records ` +
      `(${(records / (centres * itemsPerCentre) / (weeks * 5)).toFixed(2)} per series-business-day; ${counts.orders} order lines and revisions, ${counts.shipments} shipments, ${counts.baselines} baseline versions), ` +
      `${(inputBytes / 1e9).toFixed(2)} GB; generated centre by centre in ${((t1 - t0) / 1000).toFixed(1)} s, merged by arrival in ${seconds(t1)} s`,
  );
  writeFileSync(path.join(input, 'bench-size.json'), JSON.stringify({ centres, itemsPerCentre, weeks }));
}

try {
  const scenario = benchScenario(weeks);
  const input = process.env.BENCH_INPUT ?? path.join(root, 'input');
  const size = path.join(input, 'bench-size.json');
  if (existsSync(size) && readFileSync(size, 'utf8') === JSON.stringify({ centres, itemsPerCentre, weeks })) console.log(`history: reused from ${input}`);
  else await generate(input, scenario);

  const out = path.join(root, 'out');
  const t2 = performance.now();
  const cpu0 = process.cpuUsage();
  const gc = new PerformanceObserver((list) => {
    for (const e of list.getEntries()) spent.gc += e.duration;
  });
  gc.observe({ entryTypes: ['gc'] });
  const summary = await runBacktest({
    input,
    out,
    models: timed(createCoreModels({ demandBasis: 'orders' })),
    untilMs: Date.parse(scenario.cutAt),
    batchSize: 5_000,
    progressEvery: 1_000_000,
    progress: (line) => console.log(`  ${seconds(t2).padStart(7)} s  rss ${(process.memoryUsage().rss / 2 ** 30).toFixed(1)} GiB  ${line}`),
  });
  const cpu = process.cpuUsage(cpu0);
  gc.disconnect();
  const wall = (performance.now() - t2) / 1000;
  const planBytes = statSync(path.join(out, 'plans.ndjson')).size;
  console.log(`backfill: ${wall.toFixed(0)} s = ${(wall / 60).toFixed(1)} min (target < 30 min) for ${summary.logRecords} log records → ${(summary.logRecords / wall).toFixed(0)} records/s; process CPU ${((cpu.user + cpu.system) / 1e6).toFixed(0)} s`);
  console.log(`  ${summary.closes} closes, ${summary.plans} plans (${(planBytes / 1e9).toFixed(1)} GB), ${summary.alerts} alert changes, ${summary.rejected} rejected`);
  console.log(`  per close of ${itemsPerCentre} series: ${((wall * 1000) / Math.max(1, summary.closes)).toFixed(0)} ms on average (records applied between closes included)`);
  const sec = (v: number) => `${(v / 1000).toFixed(0)} s`;
  const model = spent.apply + spent.sense + spent.published + spent.closeDay;
  console.log(
    `  where the time goes: state (model.apply, ${spent.applies} facts) ${sec(spent.apply)}, sensing (model.sense) ${sec(spent.sense)}, ` +
      `monitoring and self-check (model.closeDay, ${spent.closes} closes) ${sec(spent.closeDay)}, published ${sec(spent.published)}; ` +
      `the rest (read, parse, validation, the stage's day closes and plan texts, output files) ${sec(wall * 1000 - model)}; garbage collection inside all of these ${sec(spent.gc)}`,
  );
  if (process.env.BENCH_KEEP_PLANS) console.log(`  kept: ${out}`);
} finally {
  if (!process.env.BENCH_KEEP_PLANS) rmSync(root, { recursive: true, force: true });
}
