// Benchmark of the sensing engine (issue 3): recompute of one location (fit + apply, all five leads, explanations
// included) in series per second, and state bytes per series (canonical JSON snapshot after pruning) over a
// realistic mix of volumes (log-normal, median 2 units a business day, a few fast movers of hundreds a day).
// Run: npx tsx scripts/bench/sensing.ts [sizes…]   (default 1000 10000; 100000 needs several GB of memory)
import { applyBaselineVersion } from '../../src/sensing/apply-baseline.ts';
import { applyOrderLine } from '../../src/sensing/apply-order-line.ts';
import { createLocationState } from '../../src/sensing/location-state.ts';
import { pruneLocationState } from '../../src/sensing/prune.ts';
import { senseLocation } from '../../src/sensing/sense-location.ts';
import { snapshotLocationState } from '../../src/sensing/snapshot.ts';
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

for (const n of sizes.length > 0 ? sizes : [1000, 10_000]) {
  const t0 = performance.now();
  // Generated in chunks so the record lists never all live at once.
  const chunk = 500;
  let state: ReturnType<typeof createLocationState> | undefined;
  let records = 0;
  const series = mix(n);
  let scenario;
  for (let start = 0; start < n; start += chunk) {
    scenario = generateScenario({ seed: 7 + start, weeks: WEEKS, series: series.slice(start, start + chunk) });
    state ??= createLocationState(scenario.master);
    for (const r of scenario.records) {
      records++;
      if (r.kind === 'order-line') applyOrderLine(state, r.record);
      else if (r.kind === 'baseline-version') applyBaselineVersion(state, r.record);
    }
  }
  const planDate = dayOf(scenario!, WEEKS - 1, 2);
  pruneLocationState(state!, dayNumber(planDate));
  const t1 = performance.now();
  const bytes = JSON.stringify(snapshotLocationState(state!)).length;
  // First recompute builds the per-series caches (the close after a day's records); the next ones reuse them.
  const runs: number[] = [];
  for (let k = 0; k < 3; k++) {
    const d = dayOf(scenario!, WEEKS - 1, 2 + (k === 0 ? 0 : 0));
    const c = process.cpuUsage();
    const result = senseLocation(state!, { planDate: d, knownAt: closeOf(d) });
    const u = process.cpuUsage(c);
    runs.push((u.user + u.system) / 1000);
    if (result.plans.length === 0) throw new Error('no plans');
  }
  const best = Math.min(...runs.slice(1));
  console.log(
    `${String(n).padStart(7)} series  ${(records / n).toFixed(0)} records/series  build ${((t1 - t0) / 1000).toFixed(1)} s` +
      `  recompute: first ${runs[0]!.toFixed(0)} ms CPU, then ${best.toFixed(0)} ms CPU = ${((n / best) * 1000).toFixed(0)} series/s` +
      `  state ${(bytes / n / 1024).toFixed(2)} KB/series (JSON snapshot)`,
  );
}
