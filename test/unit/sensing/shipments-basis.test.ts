import { describe, expect, it } from 'vitest';
import { sensingSettings } from '../../../src/sensing/settings.ts';
import { dayOf, generateScenario, type SeriesSpec } from './helpers/scenario.ts';
import { planAt, stateOf } from './helpers/run.ts';

const SHIP = sensingSettings({ demandBasis: 'shipments' });

describe('the shipments basis', () => {
  it('senses shipped quantity by ship date and plans it like orders when everything ships', () => {
    const series: SeriesSpec[] = Array.from({ length: 6 }, (_, i) => ({ item: `SODA-${i}`, perDay: 30 + 10 * i, noise: 'exact', earlyShare: 0.2 }));
    const sc = generateScenario({ seed: 1, weeks: 18, series, withShipments: true });
    const result = planAt(stateOf(sc, SHIP), dayOf(sc, 16, 2), SHIP);
    for (const plan of result.plans) {
      expect(plan.basis).toBe('shipments');
      for (const l of plan.leads) expect(l.adjusted).toBeCloseTo(l.baseline!, 6);
      // Lead 0: shipped Monday to Wednesday, at 15:00 on each requested date.
      expect(plan.leads[0]!.actualToDate).toBeCloseTo((3 / 5) * plan.leads[0]!.baseline!, 6);
    }
  });

  it('never reads a stock-out (open orders, short shipments) as a drop in demand', () => {
    // Orders stay at baseline; during weeks 14 and 15 only 40% of what was ordered ships. Those days are
    // censored: kept out of the ratios, so the plan does not fall with the shipments.
    const series: SeriesSpec[] = Array.from({ length: 6 }, (_, i) => ({
      item: `SODA-${i}`,
      perDay: 30 + 10 * i,
      noise: 0.02,
      earlyShare: 0.2,
      shipShare: (w: number) => (w === 14 || w === 15 ? 0.4 : 1),
    }));
    const sc = generateScenario({ seed: 2, weeks: 18, series, withShipments: true });
    const result = planAt(stateOf(sc, SHIP), dayOf(sc, 16, 2), SHIP);
    for (const plan of result.plans) {
      for (const l of plan.leads.slice(1)) expect(l.adjusted / l.baseline!).toBeGreaterThan(0.93);
      expect(plan.leads[0]!.explanation.locationFactor).toBeCloseTo(1, 2);
    }
  });
});
