import { describe, expect, it } from 'vitest';
import { actualWeekly } from './helpers/actuals.ts';
import { dayOf, generateScenario, type SeriesSpec } from './helpers/scenario.ts';
import { planAt, stateOf } from './helpers/run.ts';
import { coverage, score, wapeRatio, type Score } from './helpers/scoring.ts';

// Generated stable histories: the true mean is the baseline's (the baseline wobbles ±3% from version to version),
// demand is negative-binomial by day, a quarter is booked 7–13 days ahead, 5% of lines are later revised or
// cancelled. Plans are made every Wednesday of weeks 20–31 and scored against the weeks' final demand.

const PLAN_WEEKS = Array.from({ length: 12 }, (_, i) => 20 + i);

function run(series: SeriesSpec[], seeds: number[], key: (item: string, lead: number) => string | null): Map<string, Score> {
  const scores = new Map<string, Score>();
  for (const seed of seeds) {
    const sc = generateScenario({ seed, weeks: 38, series });
    const state = stateOf(sc);
    const actuals = actualWeekly(sc);
    for (const w of PLAN_WEEKS) score(planAt(state, dayOf(sc, w, 2)), actuals, key, scores);
  }
  return scores;
}

describe('accuracy on stable series', () => {
  it('keeps the adjusted plan within 1.02 × the baseline WAPE at every lead', () => {
    const series: SeriesSpec[] = Array.from({ length: 16 }, (_, i) => ({
      item: `STILL-WATER-${i}`,
      perDay: [5, 20, 50, 200][i % 4]!,
      noise: 0.03,
      earlyShare: 0.25,
      wobble: 0.03,
      reviseShare: 0.05,
    }));
    const scores = run(series, [1, 2, 3], (_item, lead) => `lead ${lead}`);
    const ratios = [...scores.entries()].sort().map(([k, s]) => `${k}: ${wapeRatio(s).toFixed(3)} (baseline WAPE ${(s.absBaseline / s.actual).toFixed(3)})`);
    console.info(`stable series, WAPE adjusted / WAPE baseline — ${ratios.join('; ')}`);
    for (const s of scores.values()) expect(wapeRatio(s)).toBeLessThanOrEqual(1.02);
  });
});

describe('quantile calibration', () => {
  it('covers 75–85% of actual weeks with the p10–p90 band at 10, 50 and 400 units a day, and reports 2 a day', () => {
    const levels = [2, 10, 50, 400];
    const series: SeriesSpec[] = Array.from({ length: 40 }, (_, i) => ({
      item: `CALIB-${levels[i % 4]}-${i}`,
      perDay: levels[i % 4]!,
      noise: 0.05,
      earlyShare: 0.25,
      wobble: 0.03,
    }));
    const scores = run(series, [5, 6, 7], (item, lead) => (lead >= 1 ? item.split('-')[1]! : null));
    const lines = levels.map((l) => `${l}/day: ${coverage(scores.get(String(l))!).toFixed(3)} of ${scores.get(String(l))!.n}`);
    console.info(`p10–p90 coverage of actual weeks, leads 1–4 — ${lines.join('; ')}`);
    for (const l of [10, 50, 400]) {
      expect(coverage(scores.get(String(l))!)).toBeGreaterThanOrEqual(0.75);
      expect(coverage(scores.get(String(l))!)).toBeLessThanOrEqual(0.85);
    }
  });
});
