import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import jStat from 'jstat';
import {
  DEFAULT_SELF_CHECK_SETTINGS,
  emptySelfCheck,
  evaluateSelfCheck,
  hlnTest,
  isFallbackActive,
  signTest,
  type SelfCheckState,
  type WeeklyErrors,
} from '../../../src/accuracy/self-check.ts';
import { createRng, sampleNormal } from '../../../src/stats/random.ts';

function week(i: number): string {
  const d = new Date(Date.UTC(2026, 0, 5 + 7 * i));
  return d.toISOString().slice(0, 10);
}

/** Weeks whose adjusted absolute error exceeds the baseline's by d[i]. */
function weeks(d: number[]): WeeklyErrors[] {
  return d.map((v, i) => ({ weekStart: week(i), seriesWeeks: 10, actual: 1000, absErrorBaseline: 100, absErrorAdjusted: 100 + v }));
}

function run(d: number[], lead = 0, settings = DEFAULT_SELF_CHECK_SETTINGS) {
  let state: SelfCheckState = emptySelfCheck();
  const decisions = [];
  const all = weeks(d);
  for (let i = 0; i < d.length; i++) {
    const r = evaluateSelfCheck(state, { location: 'DC-NORTH', lead, throughWeek: week(i), weeks: all }, settings);
    state = r.state;
    decisions.push(r.decision);
  }
  return { state, decisions };
}

describe('loss-differential tests', () => {
  it('computes the HLN-corrected Diebold–Mariano statistic by hand (h = 1)', () => {
    // By hand: d = 1..6, mean 3.5, γ₀ = 17.5/6; DM = 3.5/√(γ₀/6) = 7.2008; HLN factor √((6+1−2)/6) = √(5/6).
    const r = hlnTest([1, 2, 3, 4, 5, 6], 1);
    const g0 = 17.5 / 6;
    const expected = (3.5 / Math.sqrt(g0 / 6)) * Math.sqrt(5 / 6);
    expect(r.statistic).toBeCloseTo(expected, 12);
    // Source: jstat 1.9.6 studentt.cdf (good to ~1e-8).
    expect(r.pValue!).toBeCloseTo(1 - jStat.studentt.cdf(expected, 5), 7);
  });

  it('adds the lag-1 autocovariance at h = 2', () => {
    // By hand: d = [2, 0, 2, 0, 2, 0, 2, 0] − mean 1 → ±1 alternating; γ₀ = 1, γ₁ = −7/8;
    // long-run variance 1 − 7/4 < 0 → falls back to γ₀ = 1; DM = 1/√(1/8); HLN factor √((8+1−4+2/8)/8).
    const r = hlnTest([2, 0, 2, 0, 2, 0, 2, 0], 2);
    expect(r.statistic).toBeCloseTo(Math.sqrt(8) * Math.sqrt((5 + 0.25) / 8), 12);
    // d = [0, 0, 2, 2, 0, 0, 2, 2]: deviations −1, −1, 1, 1, −1, −1, 1, 1; γ₀ = 1;
    // γ₁ = (1 − 1 + 1 − 1 + 1 − 1 + 1)/8 = 1/8; long-run variance 1 + 2/8.
    const s = hlnTest([0, 0, 2, 2, 0, 0, 2, 2], 2);
    expect(s.statistic).toBeCloseTo((1 / Math.sqrt((1 + 2 / 8) / 8)) * Math.sqrt((8 + 1 - 4 + 2 / 8) / 8), 12);
  });

  it('gives the exact sign-test tail: 5 worse weeks of 6 → 7/64', () => {
    expect(signTest([1, 2, -1, 3, 4, 5]).pValue).toBeCloseTo(7 / 64, 15);
    expect(signTest([0, 0, 1]).pValue).toBeCloseTo(0.5, 14); // ties dropped: 1 of 1
  });
});

describe('self-check decisions', () => {
  it('waits for six complete weeks before deciding anything', () => {
    const { decisions } = run([50, 50, 60, 40, 55]);
    expect(decisions.every((x) => x.reason === 'too-few-weeks' && !x.fallbackActive)).toBe(true);
  });

  it('falls back when sensing loses clearly, and says why', () => {
    const { decisions, state } = run([50, 60, 40, 55, 45, 52]);
    expect(decisions[5]!.reason).toBe('sensing-loses');
    expect(decisions[5]!.changed).toBe(true);
    expect(decisions[5]!.evidence!.pValue!).toBeLessThan(0.05);
    expect(decisions[5]!.wapeAdjusted! - decisions[5]!.wapeBaseline!).toBeCloseTo(302 / 6000, 12);
    expect(isFallbackActive(state, 'DC-NORTH', 0)).toBe(true);
    expect(isFallbackActive(state, 'DC-NORTH', 1)).toBe(false);
  });

  it('does not fall back on noise around no difference', () => {
    const { decisions } = run([30, -25, 10, -40, 35, -5, 20, -30]);
    expect(decisions.some((x) => x.fallbackActive)).toBe(false);
  });

  it('stays in fallback for the minimum weeks and leaves only once sensing no longer looks worse', () => {
    // Loses for 6 weeks, then is better by 40 a week.
    const d = [50, 60, 40, 55, 45, 52, -40, -40, -40, -40, -40, -40, -40, -40, -40, -40];
    const { decisions } = run(d);
    const on = decisions.findIndex((x) => x.fallbackActive);
    expect(on).toBe(5);
    const off = decisions.findIndex((x, i) => i > on && !x.fallbackActive);
    expect(off).toBeGreaterThanOrEqual(on + DEFAULT_SELF_CHECK_SETTINGS.minWeeksInFallback);
    expect(decisions[off]!.reason).toBe('sensing-no-longer-loses');
    expect(decisions[off]!.evidence!.pValue!).toBeGreaterThan(0.5);
    // Between on and off, p rose above 0.05 yet the fallback held (hysteresis).
    const between = decisions.slice(on + 1, off);
    expect(between.some((x) => x.evidence!.pValue! > 0.05 && x.fallbackActive)).toBe(true);
  });

  it('evaluates each week once: repeating a week changes nothing', () => {
    const all = weeks([50, 60, 40, 55, 45, 52]);
    let st = emptySelfCheck();
    for (let i = 0; i < 6; i++) st = evaluateSelfCheck(st, { location: 'DC-NORTH', lead: 0, throughWeek: week(i), weeks: all }).state;
    const again = evaluateSelfCheck(st, { location: 'DC-NORTH', lead: 0, throughWeek: week(5), weeks: all });
    expect(again.state).toBe(st);
    expect(again.decision.reason).toBe('already-evaluated');
    expect(JSON.parse(JSON.stringify(st))).toEqual(st);
  });

  it('can use the sign test, which one huge week cannot tip', () => {
    const d = [-5, -5, -5, 4000, -5, -5, -5];
    const sign = run(d, 0, { ...DEFAULT_SELF_CHECK_SETTINGS, test: 'sign' });
    expect(sign.decisions.some((x) => x.fallbackActive)).toBe(false);
  });

  it('falls back in about 5 % of locations where sensing and baseline are equally good (h = 1)', () => {
    // Generated null: weekly differentials i.i.d. normal with mean 0; the first eligible decision should fire at
    // close to the nominal 5 % one-sided level.
    const rng = createRng(77);
    let fired = 0;
    const trials = 1500;
    for (let t = 0; t < trials; t++) {
      const d = Array.from({ length: 6 }, () => 20 * sampleNormal(rng));
      const r = evaluateSelfCheck(emptySelfCheck(), { location: 'DC-NORTH', lead: 0, throughWeek: week(5), weeks: weeks(d) });
      if (r.decision.fallbackActive) fired++;
    }
    expect(fired / trials).toBeGreaterThan(0.03);
    expect(fired / trials).toBeLessThan(0.07);
  });

  it('never switches back within the minimum weeks, whatever the weeks say', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -100, max: 100 }), { minLength: 6, maxLength: 30 }), (d) => {
        const { decisions } = run(d);
        let lastSwitch = -Infinity;
        for (let i = 0; i < decisions.length; i++) {
          if (!decisions[i]!.changed) continue;
          if (!decisions[i]!.fallbackActive && i - lastSwitch < DEFAULT_SELF_CHECK_SETTINGS.minWeeksInFallback) return false;
          lastSwitch = i;
        }
        return true;
      }),
      { numRuns: 200 },
    );
  });

  it('rejects settings without hysteresis', () => {
    expect(() => run([1], 0, { ...DEFAULT_SELF_CHECK_SETTINGS, offAboveP: 0.01 })).toThrow(/offAboveP/);
  });
});
