// Benchmark: time from a location's day close to its manifest for 10k series (issue 5 target: under 2 s).
// Builds one location's state from a 13-week history up to its last six business days (not timed), restores a
// sensing stage from that state's changelog (timed: snapshot and restore), then feeds each of those days' records
// and closes the day, as a running stage does. Each close is timed (the first one after a restore keeps no as-of
// signals yet); the last one, with the SQLite transaction that stores its outputs, is the figure against the target.
// NEARCAST_BENCH_SERIES changes the size.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { Session } from 'node:inspector/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { createCoreModels } from '../../src/runtime/core-location-model.ts';
import type { EventLogRecord } from '../../src/runtime/event-log-record.ts';
import { localDateOf } from '../../src/runtime/local-day.ts';
import { createSensingStage } from '../../src/runtime/sensing-stage.ts';
import { EmbeddedStore } from '../../src/transport/embedded/embedded-store.ts';
import { benchChangelog, buildBenchLocation, type BenchLocation } from './bench-state.ts';

/** BENCH_PROFILE=path writes a CPU profile of the measured (last) close only (path.<series>.cpuprofile); BENCH_PROFILE_DATE=YYYY-MM-DD
 * profiles that day's close instead (e.g. the Monday close, which prunes). */
const profiler = process.env.BENCH_PROFILE ? new Session() : undefined;
if (profiler) {
  profiler.connect();
  await profiler.post('Profiler.enable');
}
const series = Number(process.env.NEARCAST_BENCH_SERIES ?? 10_000);
const ms = (a: number, b: number) => `${(b - a).toFixed(0)} ms`;

const models = createCoreModels({ demandBasis: 'orders' });
// The six business days up to the history's last are closed one by one with their own records in between, as a
// running stage does (their records are held back from the built state). The model that built the state is
// dropped once its changelog exists (a 10k-series state is hundreds of megabytes).
let built: BenchLocation | undefined = await buildBenchLocation(series, models, 13, 6);
const { master, lastFact, day, facts, held, heldDays: businessDays } = built;
console.log(
  `state: ${series} series, ${facts} records applied in ${built.applyMs.toFixed(0)} ms (${((facts / built.applyMs) * 1000).toFixed(0)} records/s; history generated in ${built.generateMs.toFixed(0)} ms); ${held.length} records of the last ${businessDays.length} business days held back`,
);

// The changelog as a running stage leaves it: the location's base entry and one entry per part.
const t3 = performance.now();
let entries: { key: string; value: string | null }[] | undefined = benchChangelog(built);
built = undefined;
const t4 = performance.now();
const stage = createSensingStage({ partition: 0, models });
stage.restore(entries);
const t5 = performance.now();
const bytes = entries.reduce((t, e) => t + (e.value?.length ?? 0), 0);
const count = entries.length;
entries = undefined;
console.log(`changelog: ${count} entries, ${(bytes / 1e6).toFixed(1)} MB, written in ${ms(t3, t4)}; stage restored from it in ${ms(t4, t5)}`);

let offset = 0;
const applyBatch = (records: readonly EventLogRecord[]) => {
  const r = stage.apply(records.map((record) => ({ offset: String(offset++), record })));
  stage.commit();
  return r;
};
const closeRecord = (date: string, atMs: number): EventLogRecord => ({
  v: 1,
  kind: 'day-closed',
  location: master.location,
  knowledgeMs: atMs,
  arrivalMs: atMs,
  source: { kind: 'internal', origin: 'cli' },
  record: { eventId: `close-${date}`, location: master.location as never, date },
});
const profiledDay = process.env.BENCH_PROFILE_DATE ?? day;
const writeProfile = async () => {
  const { profile } = await profiler!.post('Profiler.stop');
  writeFileSync(`${process.env.BENCH_PROFILE}.${series}.cpuprofile`, JSON.stringify(profile));
};
const closes: { date: string; wallMs: number; cpuMs: number }[] = [];
let result: ReturnType<typeof stage.apply> | undefined;
let lastMs = lastFact.arrivalMs;
for (const date of businessDays) {
  const todays = held.filter((r) => localDateOf(r.arrivalMs, master.timeZone) <= date && r.arrivalMs > (closes.length === 0 ? -Infinity : lastMs));
  if (todays.length > 0) applyBatch(todays);
  for (const r of todays) lastMs = Math.max(lastMs, r.arrivalMs);
  if (profiler && date === profiledDay) await profiler.post('Profiler.start');
  const cpu0 = process.cpuUsage();
  const t6 = performance.now();
  result = stage.apply([{ offset: String(offset++), record: closeRecord(date, lastMs + 1) }]);
  const wall = performance.now() - t6;
  const cpu = process.cpuUsage(cpu0);
  closes.push({ date, wallMs: wall, cpuMs: (cpu.user + cpu.system) / 1000 });
  if (date !== day) stage.commit();
  if (profiler && date === profiledDay && date !== day) await writeProfile();
}
if (profiler && profiledDay === day) await writeProfile();
const fmt = (c: { date: string; wallMs: number; cpuMs: number }) => `${c.date} ${c.wallMs.toFixed(0)} ms (CPU ${c.cpuMs.toFixed(0)})`;
console.log(`day closes, one per business day with that day's records applied before it: ${closes.map(fmt).join(', ')}`);
const last = closes[closes.length - 1]!;
const plans = result!.outputs.filter((o) => o.topic === 'plans' && !o.key.endsWith('#manifest')).length;
const manifestAt = result!.outputs.findIndex((o) => o.key.endsWith('#manifest'));
const changelogBytes = result!.changelog.reduce((t, e) => t + (e.value?.length ?? 0), 0);
console.log(`first close after restore (no kept as-of signals): ${closes[0]!.wallMs.toFixed(0)} ms`);
console.log(`close → manifest, a day into the week of closes: ${last.wallMs.toFixed(0)} ms for ${plans} plans (manifest is output ${manifestAt + 1} of ${result!.outputs.length}; includes monitoring and the changelog of the batch: ${result!.changelog.length} entries, ${(changelogBytes / 1e6).toFixed(1)} MB)`);
// Wall time swings with whatever else the shared machine runs; the process's own CPU time is steadier.
console.log(`  CPU time of that batch: ${last.cpuMs.toFixed(0)} ms (GC threads count too)`);

const dbDir = mkdtempSync(path.join(tmpdir(), 'nc-bench-db-'));
const store = new EmbeddedStore(path.join(dbDir, 'bench.sqlite'));
const t8 = performance.now();
store.transaction(() => {
  store.writeOutputs(result!.outputs);
  store.writeChangelog(0, result!.changelog);
});
const t9 = performance.now();
stage.commit();
store.close();
console.log(`embedded commit of that batch (outputs + changelog, one SQLite transaction): ${ms(t8, t9)}`);
console.log(`close → committed manifest, embedded: ${(last.wallMs + t9 - t8).toFixed(0)} ms (target < 2000 ms)`);
rmSync(dbDir, { recursive: true, force: true });
