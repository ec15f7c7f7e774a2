// Benchmark of the sensing engine (issue 3): recompute of one location (fit + apply, all five leads, explanations
// included) in series per second, and state bytes per series (canonical JSON snapshot after pruning) over a
// realistic mix of volumes (log-normal, median 2 units a business day, a few fast movers of hundreds a day).
// Run: npx tsx scripts/bench/sensing.ts [sizes…]   (default 1000 10000; 100000 needs several GB of memory)
import { applyBaselineVersion } from '../../src/sensing/apply-baseline.ts';
import { applyOrderLine } from '../../src/sensing/apply-order-line.ts';
import { createLocationState } from '../../src/sensing/location-state.ts';
import { pruneLocationState } from '../../src/sensing/prune.ts';
import { senseLocation } from '../../src/sensing/sense-location.ts';
import { keptSignalCounts } from '../../src/sensing/as-of-cache.ts';
import { snapshotLocationState } from '../../src/sensing/snapshot.ts';
import { writeFileSync } from 'node:fs';
import { Session } from 'node:inspector/promises';
import { dayNumber } from '../../src/calendar/day-number.ts';
import { createRng, sampleNormal } from '../../src/stats/random.ts';
import { closeOf, dayOf, generateScenario, type SeriesSpec } from '../../test/unit/sensing/helpers/scenario.ts';

const sizes = process.argv.slice(2).map(Number).filter((n) => n > 0);
const WEEKS = 27;

function mix(n: number): SeriesSpec[] {
  const rng = createRng(42);
  return Array.from({ length: n }, (_, i) => {
    const perDay = Math.min(800, Math.max(0.05, Math.exp(Math.log(2) + 1.3 * sampleNormal(rng))));
    return { item: `ITEM-${i}`, perDay, noise: 0.05, earlyShare: 0.25, reviseShare: 0.05, wobble: 0.03, lineSize: Math.max(1, perDay / 6) };
  });
}

type HeldRecord = Extract<ReturnType<typeof generateScenario>['records'][number], { kind: 'order-line' | 'baseline-version' }>;

const DAILY = 5;
/** BENCH_PROFILE=path writes a CPU profile of the measured daily closes only (path.<series>.cpuprofile). */
const profiler = process.env.BENCH_PROFILE || process.env.BENCH_ALLOC ? new Session() : undefined;
if (profiler) {
  profiler.connect();
  await profiler.post(process.env.BENCH_ALLOC ? 'HeapProfiler.enable' : 'Profiler.enable');
}
/** BENCH_ALLOC=path instead samples what the measured closes allocate (path.<series>.heapprofile). */
const startProfile = () => profiler!.post(process.env.BENCH_ALLOC ? 'HeapProfiler.startSampling' : 'Profiler.start', process.env.BENCH_ALLOC ? { samplingInterval: 64 * 1024, includeObjectsCollectedByMajorGC: true, includeObjectsCollectedByMinorGC: true } : undefined);
/** Closes before the measured ones: one per business day, so each weekday's past as-of days have been computed once,
 * as in a service that closes every day (a close reuses the as-of signals of the closes 7, 14, … days before it). */
const WARM = 5;

for (const n of sizes.length > 0 ? sizes : [1000, 10_000]) {
  const t0 = performance.now();
  // Generated in chunks so the record lists never all live at once. Records known after the close before the
  // daily run are held back and applied day by day, as a running service sees them; until then they wait as JSON
  // text per day, so the generator's objects do not sit in the heap (a service parses, applies and drops records,
  // and a heap full of them would make every garbage collection of the measured closes slower).
  const chunk = 500;
  let state: ReturnType<typeof createLocationState> | undefined;
  let records = 0;
  const series = mix(n);
  let start0 = '';
  const heldDays = 28;
  const held: string[][] = Array.from({ length: heldDays + 1 }, () => []);
  for (let start = 0; start < n; start += chunk) {
    const scenario = generateScenario({ seed: 7 + start, weeks: WEEKS, series: series.slice(start, start + chunk) });
    state ??= createLocationState(scenario.master);
    start0 = scenario.start;
    const closes = Array.from({ length: heldDays + 1 }, (_, k) => closeOf(dayOf(scenario, WEEKS - 4, 2 + k)));
    const byDay: HeldRecord[][] = closes.map(() => []);
    for (const r of scenario.records) {
      if (r.kind === 'shipment') continue;
      records++;
      if (r.knownMs > closes[0]!) {
        const k = closes.findIndex((c) => r.knownMs <= c);
        if (k > 0) byDay[k]!.push(r);
      } else if (r.kind === 'order-line') applyOrderLine(state, r.record);
      else applyBaselineVersion(state, r.record);
    }
    byDay.forEach((rs, k) => rs.length > 0 && held[k]!.push(JSON.stringify(rs)));
  }
  /** The k-th day after the first plan date (Wednesday of week WEEKS − 4). */
  const dayAt = (k: number) => dayOf({ start: start0, master: state!.master, records: [], trueMean: new Map() }, WEEKS - 4, 2 + k);
  const heldOn = (k: number): HeldRecord[] =>
    (held[k] ?? [])
      .flatMap((text) => JSON.parse(text) as HeldRecord[])
      .sort((a, b) => a.knownMs - b.knownMs);
  const planDate = dayAt(0);
  pruneLocationState(state!, dayNumber(planDate));
  const t1 = performance.now();
  const bytes = JSON.stringify(snapshotLocationState(state!)).length;
  const cpu = (f: () => void): number => {
    const c = process.cpuUsage();
    f();
    const u = process.cpuUsage(c);
    return (u.user + u.system) / 1000;
  };
  const sense = (d: string) => {
    const result = senseLocation(state!, { planDate: d, knownAt: closeOf(d) });
    if (result.plans.length === 0) throw new Error('no plans');
  };
  // Same day twice: the first recompute builds the per-series caches, the second reuses every one of them.
  const first = cpu(() => sense(planDate));
  const repeat = cpu(() => sense(planDate));
  // A running service: each business day's records, then that day's close (the caches of every series that got a
  // record are stale). A week of closes first (not measured), then the next five business days, weekends skipped.
  const daily: number[] = [];
  const warm: number[] = [];
  let quiet = 0;
  for (let k = 1; daily.length < DAILY; k++) {
    if (k > heldDays) throw new Error('ran out of held-back days before the measured closes');
    const d = dayAt(k);
    const todays = heldOn(k);
    for (const r of todays) {
      if (r.kind === 'order-line') applyOrderLine(state!, r.record);
      else applyBaselineVersion(state!, r.record);
    }
    if ((2 + k) % 7 >= 5) continue;
    const measured = warm.length >= WARM;
    if (measured && profiler && daily.length === 0) await startProfile();
    const ms = cpu(() => sense(d));
    (warm.length < WARM ? warm : daily).push(ms);
    quiet += todays.length === 0 ? 1 : 0;
    if (process.env.BENCH_TRACE) console.log(d, todays.length, ms.toFixed(0), keptSignalCounts(state!));
  }
  if (profiler && process.env.BENCH_ALLOC) {
    const { profile } = await profiler.post('HeapProfiler.stopSampling');
    writeFileSync(`${process.env.BENCH_ALLOC}.${n}.heapprofile`, JSON.stringify(profile));
  } else if (profiler) {
    const { profile } = await profiler.post('Profiler.stop');
    writeFileSync(`${process.env.BENCH_PROFILE}.${n}.cpuprofile`, JSON.stringify(profile));
  }
  if (quiet > 2) throw new Error(`${quiet} closes had no new records: the bench would not measure daily closes`);
  daily.sort((a, b) => a - b);
  const med = daily[daily.length >> 1]!;
  console.log(
    `${String(n).padStart(7)} series  ${(records / n).toFixed(0)} records/series  build ${((t1 - t0) / 1000).toFixed(1)} s` +
      `  recompute: cold ${first.toFixed(0)} ms, same day again ${repeat.toFixed(0)} ms = ${((n / repeat) * 1000).toFixed(0)} series/s,` +
      ` first closes of each weekday ${warm.map((x) => x.toFixed(0)).join('/')} ms,` +
      ` daily close (median of ${DAILY}) ${med.toFixed(0)} ms CPU = ${((n / med) * 1000).toFixed(0)} series/s` +
      `  state ${(bytes / n / 1024).toFixed(2)} KB/series (JSON snapshot)`,
  );
}
