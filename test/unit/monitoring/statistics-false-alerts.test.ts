import { describe, expect, it } from 'vitest';
import { monitoringSettings } from '../../../src/monitoring/settings.ts';
import { figures, makeSeries, runScenario, type Scenario } from '../../../src/monitoring/simulate.ts';

// Statistical behaviour on fixed seeds (scripts/bench/monitoring.ts prints the same figures for larger runs).
// "Alerts" here are series-level openings and re-openings after false-discovery control and before grouping and the
// page budget; the value floor is switched off so that every statistical signal counts.
const STATISTICAL = monitoringSettings({ floor: { minUnits: 0, minShare: 0, minValue: 0 } });
const BUDGET = monitoringSettings().budget.pagesPerLocationDay;

function falseAlerts(range: Parameters<typeof makeSeries>[2], seeds: number[], settings = STATISTICAL, pages = true) {
  let alerts = 0;
  let seriesDays = 0;
  let maxPages = 0;
  for (const seed of seeds) {
    const sc: Scenario = { location: 'DC-NORTH', seed, businessDays: 80, series: makeSeries(seed * 7, 40, range) };
    const f = figures(sc, runScenario(sc, settings));
    alerts += f.falseAlerts;
    seriesDays += f.seriesDays;
    // Pages are counted with the default settings' grouping, floor and budget in place (on the first seed).
    if (pages && seed === seeds[0]) maxPages = figures(sc, runScenario(sc)).maxPagesPerDay;
  }
  return { per100: (100 * alerts) / seriesDays, alerts, seriesDays, maxPages };
}

describe('false alerts on stable series', () => {
  it('stays at or below 1 per 100 series-days on Poisson series of 1 to 200 a day, and pages within budget', () => {
    const r = falseAlerts({ lo: 1, hi: 200 }, [1, 2]);
    console.info(`stable Poisson: ${r.per100.toFixed(2)} alerts per 100 series-days (${r.alerts}/${r.seriesDays}); most pages on a day ${r.maxPages}`);
    expect(r.per100).toBeLessThanOrEqual(1);
    expect(r.maxPages).toBeLessThanOrEqual(BUDGET);
  });

  it('stays at or below 1 per 100 series-days on overdispersed series (φ from 0 to 0.1), and pages within budget', () => {
    const r = falseAlerts({ lo: 1, hi: 200, phiLo: 0, phiHi: 0.1 }, [3, 4]);
    console.info(`overdispersed: ${r.per100.toFixed(2)} alerts per 100 series-days (${r.alerts}/${r.seriesDays}); most pages on a day ${r.maxPages}`);
    expect(r.per100).toBeLessThanOrEqual(1);
    expect(r.maxPages).toBeLessThanOrEqual(BUDGET);
  });

  it('keeps autocorrelated series (a level that wanders for days) within budget because σ includes the long-run variance', () => {
    const wander = { lo: 20, hi: 200, wander: { rho: 0.7, sd: 0.05 } };
    const withFactor = falseAlerts(wander, [5, 6], STATISTICAL, false);
    const dayToDayOnly = falseAlerts(wander, [5, 6], monitoringSettings({ noise: { maxVarianceFactor: 1 }, floor: { minUnits: 0, minShare: 0, minValue: 0 } }), false);
    console.info(`autocorrelated: ${withFactor.per100.toFixed(2)} per 100 with the long-run variance, ${dayToDayOnly.per100.toFixed(2)} with day-to-day noise only`);
    expect(withFactor.per100).toBeLessThanOrEqual(1);
    expect(dayToDayOnly.per100).toBeGreaterThan(1.5 * withFactor.per100);
  });
});
