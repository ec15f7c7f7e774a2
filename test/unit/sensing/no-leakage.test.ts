import { describe, expect, it } from 'vitest';
import { featuresAt } from '../../../src/sensing/feature-audit.ts';
import { sensingSettings, type SensingSettings } from '../../../src/sensing/settings.ts';
import { senseWork } from '../../../src/sensing/sense-location.ts';
import { closeOf, dayOf, generateScenario, type SeriesSpec } from './helpers/scenario.ts';
import { stateOf } from './helpers/run.ts';

const BASES: [string, SensingSettings | undefined][] = [
  ['orders', undefined],
  ['shipments', sensingSettings({ demandBasis: 'shipments' })],
];

describe('knowledge time', () => {
  it.each(BASES)('gives the same features (%s basis) on day D from the records known then as recomputed on D+35 from the full history', (_basis, settings) => {
    // 30% of lines are revised (quantity changed, requested date moved, or cancelled) up to 62 hours after they
    // were placed, so many lines known on D change after D; shifts and a re-plan make the features non-trivial.
    const series: SeriesSpec[] = Array.from({ length: 8 }, (_, i) => ({
      item: `GINGER-ALE-${i}`,
      perDay: [3, 15, 40, 120][i % 4]!,
      noise: 0.05,
      earlyShare: 0.3,
      reviseShare: 0.3,
      wobble: 0.03,
      level: (w: number) => (i % 2 === 0 && w >= 15 ? 1.25 : 1),
      baselineLevel: (published: number, target: number) => (i === 4 && published >= 17 && target >= 17 ? 1.2 : 1),
      // On the shipments basis a short-shipped stretch around D (censored days) must not leak either.
      ...(settings ? { shipShare: (w: number) => (i % 4 === 1 && (w === 17 || w === 18) ? 0.5 : 1) } : {}),
    }));
    const sc = generateScenario({ seed: 9, weeks: 26, series, withShipments: settings !== undefined });
    const D = dayOf(sc, 18, 2);
    const later = dayOf(sc, 23, 2); // D + 35 days, same weekday
    const knownOnD = sc.records.filter((r) => r.knownMs <= closeOf(D));
    // The test means something only if lines known on D were changed after D.
    const changedAfter = sc.records.filter((r) => r.kind === 'order-line' && r.knownMs > closeOf(D) && Date.parse(r.record.orderedAt) <= closeOf(D));
    expect(changedAfter.length).toBeGreaterThan(20);

    const live = senseWork(stateOf(sc, settings, knownOnD), { planDate: D, knownAt: closeOf(D) }, settings);
    const recomputed = senseWork(stateOf(sc, settings), { planDate: later, knownAt: closeOf(later) }, settings);
    let compared = 0;
    for (const s of series) {
      for (let lead = 0; lead <= 4; lead++) {
        const a = featuresAt(live, s.item, lead, lead); // live: target week = lead weeks after D's week
        const b = featuresAt(recomputed, s.item, lead - 5, lead); // the same target week, five weeks later
        expect(a === undefined).toBe(b === undefined);
        if (!a || !b) continue;
        expect(Array.from(b.x)).toEqual(Array.from(a.x));
        expect(b.baseline).toBe(a.baseline);
        expect(b.booked).toBe(a.booked);
        expect(b.bookShare).toBe(a.bookShare);
        expect(b.recentRatio).toBe(a.recentRatio);
        compared++;
      }
    }
    expect(compared).toBeGreaterThanOrEqual(35);
  });
});
