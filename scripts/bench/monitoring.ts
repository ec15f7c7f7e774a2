// Monitoring's statistical figures on larger seeded runs than the unit tests can afford, plus its speed.
// Run: npx tsx scripts/bench/monitoring.ts [--quick]
// Prints false alerts per 100 series-days (after false-discovery control, before grouping and the page budget),
// pages per location-day, and the median detection delay of a +30% level shift by volume and dispersion.
import { monitoringSettings } from '../../src/monitoring/settings.ts';
import { figures, makeSeries, median, runScenario, type Scenario } from '../../src/monitoring/simulate.ts';

const quick = process.argv.includes('--quick');
const SEEDS = quick ? [1, 2] : [1, 2, 3, 4, 5, 6, 7, 8];
const SERIES = 40;
const STATISTICAL = monitoringSettings({ floor: { minUnits: 0, minShare: 0, minValue: 0 } });

type Range = Parameters<typeof makeSeries>[2];

function falseAlertRow(name: string, range: Range, settings = STATISTICAL): void {
  let alerts = 0;
  let seriesDays = 0;
  let maxPages = 0;
  let pageDays = 0;
  let pages = 0;
  for (const seed of SEEDS) {
    const sc: Scenario = { location: 'DC-NORTH', seed, businessDays: 120, series: makeSeries(seed * 7919, SERIES, range) };
    const f = figures(sc, runScenario(sc, settings));
    alerts += f.falseAlerts;
    seriesDays += f.seriesDays;
    const days = runScenario(sc);
    for (const d of days) {
      const n = d.alerts.filter((a) => a.delivery === 'page' && ['opened', 'reopened', 'escalated', 'snooze-ended'].includes(a.change)).length;
      pages += n;
      pageDays++;
      maxPages = Math.max(maxPages, n);
    }
  }
  const per100 = (100 * alerts) / seriesDays;
  // Poisson interval of the count, normal approximation (common practice for counts above ~20).
  const half = (196 * Math.sqrt(Math.max(alerts, 1))) / seriesDays;
  console.log(
    `${name.padEnd(44)} ${per100.toFixed(3).padStart(6)} ± ${half.toFixed(3)} per 100 series-days  (${alerts}/${seriesDays})` +
      `   pages/location-day mean ${(pages / pageDays).toFixed(2)} max ${maxPages}`,
  );
}

function delayRow(name: string, range: Range, gate?: number): void {
  const all: number[] = [];
  const alerted: number[] = [];
  for (const seed of SEEDS) {
    const sc: Scenario = { location: 'DC-NORTH', seed, businessDays: 80, series: makeSeries(seed * 104_729, SERIES, range, { factor: 1.3, fromDayLo: 30, fromDayHi: 45 }) };
    const days = runScenario(sc);
    const f = figures(sc, days);
    alerted.push(...f.delays.map((d) => d.delay));
    // Statistical detection, whether or not the value floor let the signal through.
    for (const s of sc.series) {
      const hit = days.find((d) => d.index >= s.shift!.fromDay && d.result.digest!.signals.some((g) => g.item === s.item && g.direction === 'up'));
      all.push(hit ? hit.index - s.shift!.fromDay + 1 : Infinity);
    }
  }
  const q = (v: number[], p: number) => [...v].sort((a, b) => a - b)[Math.floor(p * (v.length - 1))]!;
  const missed = alerted.filter((d) => !Number.isFinite(d)).length;
  console.log(
    `${name.padEnd(44)} median ${String(median(alerted)).padStart(4)}  p25 ${q(alerted, 0.25)}  p75 ${q(alerted, 0.75)}` +
      `  (statistical ${median(all)})  n=${alerted.length}  not alerted in 35–50 days: ${missed}` +
      (gate === undefined ? '  [reported, no gate]' : `  [gate ≤ ${gate}: ${median(alerted) <= gate ? 'met' : 'NOT met'}]`),
  );
}

function speed(): void {
  const series = makeSeries(5, 400, { lo: 1, hi: 400, phiHi: 0.05 });
  const sc: Scenario = { location: 'DC-NORTH', seed: 5, businessDays: 60, series };
  runScenario({ ...sc, businessDays: 5 });
  const t0 = performance.now();
  runScenario(sc);
  const ms = performance.now() - t0;
  console.log(`speed: ${((1000 * ms) / (400 * 60)).toFixed(1)} µs per series-day (400 series × 60 days, state copied per day)`);
}

console.log(`nearcast monitoring benchmark — ${SEEDS.length} seeds × ${SERIES} series per scenario${quick ? ' (quick)' : ''}\n`);
console.log('False alerts on stable series (value floor off, so every statistical signal counts):');
falseAlertRow('Poisson, 1–200/day', { lo: 1, hi: 200 });
falseAlertRow('Poisson, 0.2–5/day', { lo: 0.2, hi: 5 });
falseAlertRow('overdispersed φ 0–0.1, 1–200/day', { lo: 1, hi: 200, phiHi: 0.1 });
falseAlertRow('overdispersed φ 0.05, 50–200/day', { lo: 50, hi: 200, phiLo: 0.05, phiHi: 0.05 });
falseAlertRow('autocorrelated (AR 0.7, sd 0.05), 20–200/day', { lo: 20, hi: 200, wander: { rho: 0.7, sd: 0.05 } });
falseAlertRow('autocorrelated (AR 0.8, sd 0.06), 20–200/day', { lo: 20, hi: 200, wander: { rho: 0.8, sd: 0.06 } });
falseAlertRow('  same, long-run variance factor off', { lo: 20, hi: 200, wander: { rho: 0.8, sd: 0.06 } }, monitoringSettings({ noise: { maxVarianceFactor: 1 }, floor: { minUnits: 0, minShare: 0, minValue: 0 } }));
console.log('\nDetection delay of a +30% level shift, business days from the first shifted day (inclusive):');
delayRow('near-Poisson, 50–200/day', { lo: 50, hi: 200 }, 3);
delayRow('  Poisson, exactly 50/day', { lo: 50, hi: 50.0001 });
delayRow('dispersion φ 0–0.05, 50–200/day', { lo: 50, hi: 200, phiHi: 0.05 }, 5);
delayRow('  φ exactly 0.05, 50/day', { lo: 50, hi: 50.0001, phiLo: 0.05, phiHi: 0.05 });
delayRow('  φ exactly 0.05, 200/day', { lo: 200, hi: 200.0001, phiLo: 0.05, phiHi: 0.05 });
delayRow('Poisson, 10–50/day', { lo: 10, hi: 50 }, 7);
delayRow('  Poisson, exactly 10/day', { lo: 10, hi: 10.0001 });
delayRow('Poisson, 1–10/day', { lo: 1, hi: 10 });
console.log('');
speed();
