import { describe, expect, it } from 'vitest';
import { monitoringSettings } from '../../../src/monitoring/settings.ts';
import { figures, makeSeries, median, runScenario, type Scenario } from '../../../src/monitoring/simulate.ts';

// Detection delay of an injected +30% level shift on fixed seeds: business days from the first shifted day to the
// first signal in its direction that reaches an alert, counting the first shifted day as 1. Each location has 40
// series shifting on random days 30–45 of 70 (scripts/bench/monitoring.ts runs the same at larger sizes).
const BUDGET = monitoringSettings().budget.pagesPerLocationDay;

function delays(range: Parameters<typeof makeSeries>[2], seeds: number[]) {
  const all: number[] = [];
  let maxPages = 0;
  for (const seed of seeds) {
    const sc: Scenario = { location: 'DC-NORTH', seed, businessDays: 70, series: makeSeries(seed * 13, 40, range, { factor: 1.3, fromDayLo: 30, fromDayHi: 45 }) };
    const f = figures(sc, runScenario(sc));
    all.push(...f.delays.map((d) => d.delay));
    maxPages = Math.max(maxPages, f.maxPagesPerDay);
  }
  return { median: median(all), n: all.length, undetected: all.filter((d) => !Number.isFinite(d)).length, maxPages };
}

describe('detection of a +30% level shift', () => {
  it('takes a median of at most 3 business days on near-Poisson series of 50 or more a day', () => {
    const r = delays({ lo: 50, hi: 200 }, [1, 2]);
    console.info(`near-Poisson 50–200/day: median ${r.median} days over ${r.n} series`);
    expect(r.median).toBeLessThanOrEqual(3);
    expect(r.maxPages).toBeLessThanOrEqual(BUDGET);
  });

  it('takes a median of at most 5 on series with dispersion up to 0.05 (50–200 a day)', () => {
    const r = delays({ lo: 50, hi: 200, phiLo: 0, phiHi: 0.05 }, [1, 2]);
    console.info(`dispersion 0–0.05, 50–200/day: median ${r.median} days over ${r.n} series`);
    expect(r.median).toBeLessThanOrEqual(5);
  });

  it('takes a median of at most 7 on series of 10 to 50 a day', () => {
    const r = delays({ lo: 10, hi: 50 }, [1, 2]);
    console.info(`Poisson 10–50/day: median ${r.median} days over ${r.n} series`);
    expect(r.median).toBeLessThanOrEqual(7);
  });

  it('reports (without a gate) the delay below 10 a day', () => {
    const r = delays({ lo: 1, hi: 10 }, [1, 2]);
    console.info(`Poisson 1–10/day: median ${r.median} days over ${r.n} series, ${r.undetected} not detected within 25–40 days`);
    expect(r.n).toBe(80);
  });
});

describe('a stalled feed', () => {
  // The feed stops at 10:00 on business day 30 and stays down for two days; on day 32 it resumes at 09:00 and
  // delivers the missed records, which the runtime passes as late data for their own (closed) days.
  const sc: Scenario = {
    location: 'DC-NORTH',
    seed: 7,
    businessDays: 45,
    series: makeSeries(71, 40, { lo: 5, hi: 200 }),
    stall: { day: 30, hour: 10, days: 2 },
    hourlyFeedChecks: true,
  };
  const days = runScenario(sc);
  const records = days.flatMap((d) => d.alerts.map((a) => ({ ...a, index: d.index })));

  it('gives one feed-health alert, opened during the first stalled day and resolved when records flow again', () => {
    const feed = records.filter((r) => r.rule === 'feed-stalled' || r.rule === 'day-not-closed');
    expect(new Set(feed.map((r) => r.alertId)).size).toBe(1);
    expect(feed.map((r) => [r.rule, r.change, r.index])).toEqual([
      ['feed-stalled', 'opened', 30],
      ['feed-stalled', 'auto-resolved', 32],
    ]);
    expect(feed[0]!.delivery).toBe('page');
  });

  it('raises no wave of drop alerts while stalled, and its catch-up no wave of spikes', () => {
    const around = records.filter((r) => r.index >= 30 && r.index <= 34 && r.scope !== 'location');
    const drops = around.filter((r) => (r.rule === 'drop' || r.rule === 'shift-down' || r.rule === 'demand-down') && r.change === 'opened');
    const spikes = around.filter((r) => (r.rule === 'spike' || r.rule === 'shift-up' || r.rule === 'demand-up') && r.change === 'opened');
    expect(drops).toEqual([]);
    // At most the background rate: 40 series × 5 days at well under 1 per 100.
    expect(spikes.length).toBeLessThanOrEqual(1);
    expect(records.some((r) => r.scope === 'location' && r.rule.startsWith('demand'))).toBe(false);
    expect(days[30]!.result.digest!.heldBack).toBe('feed');
    expect(days[32]!.result.digest!.lateData.length).toBeGreaterThan(0);
  });
});
