// Benchmark: time from a location's day close to its manifest for 10k series (issue 5 target: under 2 s).
// Builds one location's state from a 13-week history (not timed), restores a sensing stage from that state's
// changelog entry (timed: snapshot and restore), then applies the one record that closes the day and measures
// the batch that yields 10k plans and the manifest, and the SQLite transaction that stores them.
// NEARCAST_BENCH_SERIES changes the size.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { RecordValidator } from '../../src/contracts/validate.ts';
import { writeHistory } from '../../src/demo/write-history.ts';
import { createCoreModels } from '../../src/runtime/core-location-model.ts';
import type { EventLogRecord } from '../../src/runtime/event-log-record.ts';
import { historyStream } from '../../src/runtime/history/history-stream.ts';
import { isBusinessDay } from '../../src/runtime/local-day.ts';
import { newRuntimeState } from '../../src/runtime/location-runtime-state.ts';
import { createSensingStage } from '../../src/runtime/sensing-stage.ts';
import { DEFAULT_STAGE_SETTINGS } from '../../src/runtime/stage-settings.ts';
import { EmbeddedStore } from '../../src/transport/embedded/embedded-store.ts';
import { benchHistory } from './bench-history.ts';

const series = Number(process.env.NEARCAST_BENCH_SERIES ?? 10_000);
const ms = (a: number, b: number) => `${(b - a).toFixed(0)} ms`;

const t0 = performance.now();
// Only what a running stage holds stays in memory: the generated history is written out and dropped, the model
// that built the state is dropped once its changelog exists (a 10k-series state is hundreds of megabytes).
const input = mkdtempSync(path.join(tmpdir(), 'nc-bench-close-'));
const { master, scenario } = (() => {
  const { history, scenario } = benchHistory({ centres: 1, itemsPerCentre: series, weeks: 13 });
  writeHistory(input, history);
  return { master: history.locations[0] as EventLogRecord['record'] & { location: string; timeZone: string }, scenario };
})();
const models = createCoreModels({ demandBasis: 'orders' });
let model: ReturnType<typeof models.create> | undefined = models.create(master as never);
let facts = 0;
let lastFact: EventLogRecord | undefined;
const t1 = performance.now();
for await (const r of historyStream(input, { validator: new RecordValidator(), settings: DEFAULT_STAGE_SETTINGS, onRejected: () => {} })) {
  if (r.kind !== 'order-line' && r.kind !== 'shipment' && r.kind !== 'baseline-version') continue;
  model!.apply(r);
  facts++;
  lastFact = r;
}
const t2 = performance.now();
console.log(`state: ${series} series, ${facts} records applied in ${ms(t1, t2)} (${((facts / (t2 - t1)) * 1000).toFixed(0)} records/s; history generated in ${ms(t0, t1)})`);

// The last business day of the history is the day to close.
let day = scenario.cutAt.slice(0, 10);
do day = new Date(Date.parse(`${day}T00:00:00Z`) - 86_400_000).toISOString().slice(0, 10);
while (!isBusinessDay(master as never, day));
const runtime = { ...newRuntimeState(master as never, lastFact!.arrivalMs), nextDate: day, lastFeedArrivalMs: lastFact!.arrivalMs };

// The changelog as a running stage leaves it: the location's base entry and one entry per part.
const t3 = performance.now();
const { base, parts } = model.snapshotParts!();
model = undefined;
let entries: { key: string; value: string }[] | undefined = [
  { key: master.location, value: JSON.stringify({ runtime, model: base, parted: true }) },
  ...[...parts].map(([k, v]) => ({ key: `${master.location}|${k}`, value: JSON.stringify(v) })),
  { key: '#partition', value: JSON.stringify({ partition: 0, nextOffset: '0' }) },
];
const t4 = performance.now();
const stage = createSensingStage({ partition: 0, models });
stage.restore(entries);
const t5 = performance.now();
const bytes = entries.reduce((t, e) => t + e.value.length, 0);
const count = entries.length;
entries = undefined;
console.log(`changelog: ${count} entries, ${(bytes / 1e6).toFixed(1)} MB, written in ${ms(t3, t4)}; stage restored from it in ${ms(t4, t5)}`);

const close: EventLogRecord = {
  v: 1,
  kind: 'day-closed',
  location: master.location,
  knowledgeMs: lastFact!.arrivalMs + 1,
  arrivalMs: lastFact!.arrivalMs + 1,
  source: { kind: 'internal', origin: 'cli' },
  record: { eventId: `close-${day}`, location: master.location as never, date: day },
};
const cpu0 = process.cpuUsage();
const t6 = performance.now();
const result = stage.apply([{ offset: '0', record: close }]);
const t7 = performance.now();
const cpu = process.cpuUsage(cpu0);
const plans = result.outputs.filter((o) => o.topic === 'plans' && !o.key.endsWith('#manifest')).length;
const manifestAt = result.outputs.findIndex((o) => o.key.endsWith('#manifest'));
const changelogBytes = result.changelog.reduce((t, e) => t + (e.value?.length ?? 0), 0);
console.log(`close → manifest: ${ms(t6, t7)} for ${plans} plans (manifest is output ${manifestAt + 1} of ${result.outputs.length}; includes monitoring and the changelog of the batch: ${result.changelog.length} entries, ${(changelogBytes / 1e6).toFixed(1)} MB)`);
// Wall time swings with whatever else the shared machine runs; the process's own CPU time is steadier.
console.log(`  CPU time of that batch: ${((cpu.user + cpu.system) / 1000).toFixed(0)} ms (user ${(cpu.user / 1000).toFixed(0)}, system ${(cpu.system / 1000).toFixed(0)}; GC threads count too)`);

const dbDir = mkdtempSync(path.join(tmpdir(), 'nc-bench-db-'));
const store = new EmbeddedStore(path.join(dbDir, 'bench.sqlite'));
const t8 = performance.now();
store.transaction(() => {
  store.writeOutputs(result.outputs);
  store.writeChangelog(0, result.changelog);
});
const t9 = performance.now();
stage.commit();
store.close();
console.log(`embedded commit of that batch (outputs + changelog, one SQLite transaction): ${ms(t8, t9)}`);
console.log(`close → committed manifest, embedded: ${ms(t6, t9)} (target < 2000 ms)`);
rmSync(input, { recursive: true, force: true });
rmSync(dbDir, { recursive: true, force: true });
