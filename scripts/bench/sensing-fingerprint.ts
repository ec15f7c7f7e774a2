// Output fingerprint of the sensing engine, the guard for performance work: SHA-256 of senseLocation's full
// result on five consecutive business days (each after applying that day's records, the previous close's plans
// passed on), of the pruned state's JSON snapshot, and of the plans recomputed from the restored snapshot.
// Same generation as scripts/bench/sensing.ts, smaller. A second scenario covers the shipments basis.
// Run: npx tsx scripts/bench/sensing-fingerprint.ts [series]   (default 300)
import { createHash } from 'node:crypto';
import { applyBaselineVersion } from '../../src/sensing/apply-baseline.ts';
import { applyOrderLine } from '../../src/sensing/apply-order-line.ts';
import { applyShipment } from '../../src/sensing/apply-shipment.ts';
import { createLocationState, type LocationState } from '../../src/sensing/location-state.ts';
import { pruneLocationState } from '../../src/sensing/prune.ts';
import { senseLocation, type SenseResult } from '../../src/sensing/sense-location.ts';
import { sensingSettings, type SensingSettings } from '../../src/sensing/settings.ts';
import { decodeColumn } from '../../src/sensing/column-codec.ts';
import { baselineList, restoreLocationState, snapshotLocationState, type LocationStateSnapshot } from '../../src/sensing/snapshot.ts';
import { dayNumber } from '../../src/calendar/day-number.ts';
import { createRng, sampleNormal } from '../../src/stats/random.ts';
import { closeOf, dayOf, generateScenario, type ScenarioRecord, type SeriesSpec } from '../../test/unit/sensing/helpers/scenario.ts';

const WEEKS = 27;
const n = Number(process.argv[2] ?? 300);

function mix(count: number): SeriesSpec[] {
  const rng = createRng(42);
  return Array.from({ length: count }, (_, i) => {
    const perDay = Math.min(800, Math.max(0.05, Math.exp(Math.log(2) + 1.3 * sampleNormal(rng))));
    return { item: `ITEM-${i}`, perDay, noise: 0.05, earlyShare: 0.25, reviseShare: 0.05, wobble: 0.03, lineSize: Math.max(1, perDay / 6) };
  });
}

const sha = (value: unknown): string => createHash('sha256').update(JSON.stringify(value)).digest('hex');

function apply(state: LocationState, r: ScenarioRecord): void {
  if (r.kind === 'order-line') applyOrderLine(state, r.record);
  else if (r.kind === 'baseline-version') applyBaselineVersion(state, r.record);
  else applyShipment(state, r.record);
}

// The snapshot with every encoded column written out as a plain list under the version-1 schema name: its hash is
// comparable with fingerprints taken before the compact column form (version 2).
function asPlainLists(snap: LocationStateSnapshot): unknown {
  const plain = (cols: Record<string, string | number[]>) =>
    Object.fromEntries(Object.entries(cols).map(([k, v]) => [k, typeof v === 'string' ? decodeColumn(v) : v]));
  return {
    ...snap,
    schema: 'nearcast.sensing-state.v1',
    series: snap.series.map((x) => ({
      ...x,
      lines: plain(x.lines),
      shipments: plain(x.shipments),
      baselines: baselineList(x.baselines),
    })),
  };
}

function run(label: string, count: number, withShipments: boolean, settings?: SensingSettings): void {
  const specs = mix(count);
  const chunk = 500;
  const records: ScenarioRecord[] = [];
  let scenario;
  for (let start = 0; start < count; start += chunk) {
    scenario = generateScenario({ seed: 7 + start, weeks: WEEKS, series: specs.slice(start, start + chunk), withShipments });
    for (const r of scenario.records) records.push(r);
  }
  records.sort((a, b) => a.knownMs - b.knownMs);
  const state = createLocationState(scenario!.master);
  let next = 0;
  let previous: SenseResult | undefined;
  let lastDate = '';
  for (let wd = 0; wd < 5; wd++) {
    const d = dayOf(scenario!, WEEKS - 2, wd);
    const close = closeOf(d);
    while (next < records.length && records[next]!.knownMs <= close) apply(state, records[next++]!);
    const result = senseLocation(state, { planDate: d, knownAt: close }, settings, { previousPlans: previous?.plans, revision: wd + 1 });
    console.log(`${label} plan ${d}  ${sha(result)}`);
    previous = result;
    lastDate = d;
  }
  pruneLocationState(state, dayNumber(lastDate));
  const snap = snapshotLocationState(state);
  console.log(`${label} snapshot      ${sha(snap)}`);
  console.log(`${label} snapshot v1   ${sha(asPlainLists(snap))} (as plain lists, ${JSON.stringify(snap).length} bytes)`);
  const restored = restoreLocationState(JSON.parse(JSON.stringify(snap)));
  const again = senseLocation(restored, { planDate: lastDate, knownAt: closeOf(lastDate) }, settings);
  const direct = senseLocation(state, { planDate: lastDate, knownAt: closeOf(lastDate) }, settings);
  console.log(`${label} restored plan ${sha(again)} ${sha(again) === sha(direct) ? 'same as live' : 'DIFFERS FROM LIVE'}`);
}

run('orders', n, false);
run('shipments', Math.max(1, Math.round(n / 3)), true, sensingSettings({ demandBasis: 'shipments' }));
