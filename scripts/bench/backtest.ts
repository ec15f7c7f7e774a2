// Benchmark: `nearcast backtest` over a 13-week history of 10k series (issue 5: "minutes, not hours").
// NEARCAST_BENCH_SERIES and NEARCAST_BENCH_CENTRES change the size. Prints generation, replay and throughput figures.
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { writeHistory } from '../../src/demo/write-history.ts';
import { runBacktest } from '../../src/runtime/backtest/run-backtest.ts';
import { createCoreModels } from '../../src/runtime/core-location-model.ts';
import { benchHistory } from './bench-history.ts';

const series = Number(process.env.NEARCAST_BENCH_SERIES ?? 10_000);
const centres = Number(process.env.NEARCAST_BENCH_CENTRES ?? 5);
const weeks = 13;
const t0 = performance.now();
const { history, scenario } = benchHistory({ centres, itemsPerCentre: Math.round(series / centres), weeks });
const input = mkdtempSync(path.join(tmpdir(), 'nc-bench-in-'));
writeHistory(input, history);
const records = history.orders.length + history.shipments.length + history.baselines.length;
const t1 = performance.now();
console.log(`history: ${centres} centres × ${Math.round(series / centres)} items = ${series} series, ${weeks} weeks, ${records} records (${(records / series / (weeks * 5)).toFixed(2)} per series-business-day), generated and written in ${((t1 - t0) / 1000).toFixed(1)} s`);

const out = mkdtempSync(path.join(tmpdir(), 'nc-bench-out-'));
const summary = await runBacktest({
  input,
  out,
  models: createCoreModels({ demandBasis: 'orders' }),
  untilMs: Date.parse(scenario.cutAt),
  batchSize: 5_000,
  progressEvery: 250_000,
  progress: (line) => {
    console.log(`  ${((performance.now() - t1) / 1000).toFixed(0).padStart(5)} s  ${line}`);
  },
});
const t2 = performance.now();
const seconds = (t2 - t1) / 1000;
const planBytes = statSync(path.join(out, 'plans.ndjson')).size;
console.log(`backtest: ${seconds.toFixed(1)} s (${(seconds / 60).toFixed(1)} min) for ${summary.logRecords} log records → ${(summary.logRecords / seconds).toFixed(0)} records/s`);
console.log(`  ${summary.closes} closes, ${summary.plans} plans (${(planBytes / 1e6).toFixed(0)} MB), ${summary.alerts} alert changes, ${summary.rejected} rejected`);
console.log(`  per close of ${Math.round(series / centres)} series: ${((seconds * 1000) / Math.max(1, summary.closes)).toFixed(0)} ms on average (including the records applied between closes)`);
rmSync(input, { recursive: true, force: true });
rmSync(out, { recursive: true, force: true });
