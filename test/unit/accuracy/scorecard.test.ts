import { describe, expect, it } from 'vitest';
import { emptyScorecard, recordWeek, summarise, weeklyErrors, type SeriesWeekScore } from '../../../src/accuracy/scorecard.ts';
import { accuracySummarySchema } from '../../../src/contracts/accuracy-summary.ts';
import { emptySelfCheck, evaluateSelfCheck } from '../../../src/accuracy/self-check.ts';

const s = (item: string, actual: number, baseline: number | null, adjusted: number, perDay: number, p10?: number, p90?: number): SeriesWeekScore => ({
  item,
  actual,
  baseline,
  adjusted,
  meanUnitsPerDay: perDay,
  p10: p10 ?? null,
  p90: p90 ?? null,
});

describe('scorecard', () => {
  it('sums a week per volume band and over all bands, with hand-worked WAPE, bias, FVA and coverage', () => {
    // By hand: COLA-1L (100/day, band 50-400): actual 700, baseline 600, adjusted 680, band [650, 750] → inside.
    // SPARK-LEMON-330 (5/day, band 1-10): actual 40, baseline 35, adjusted 45, band [30, 40] → on the end, ½.
    const { state, rejected } = recordWeek(emptyScorecard(), {
      location: 'DC-NORTH',
      lead: 1,
      weekStart: '2026-03-02',
      series: [s('COLA-1L', 700, 600, 680, 100, 650, 750), s('SPARK-LEMON-330', 40, 35, 45, 5, 30, 40)],
    });
    expect(rejected).toEqual([]);
    const out = summarise(state, { location: 'DC-NORTH', throughWeek: '2026-03-02' });
    expect(out.map((r) => r.volumeBand)).toEqual(['1-10', '50-400', 'all']);
    const all = out[2]!;
    // baseline: Σ|e| = 100 + 5 = 105, Σe = −105, Σa = 740; adjusted: Σ|e| = 20 + 5 = 25, Σe = −20 + 5 = −15.
    expect(all.baseline.wape).toBeCloseTo(105 / 740, 15);
    expect(all.baseline.bias).toBeCloseTo(-105 / 740, 15);
    expect(all.adjusted.wape).toBeCloseTo(25 / 740, 15);
    expect(all.adjusted.bias).toBeCloseTo(-15 / 740, 15);
    expect(all.fva).toBeCloseTo((105 - 25) / 105, 14);
    expect(all.bandCoverage).toBe(0.75);
    expect(all.seriesWeeks).toBe(2);
    expect(out[0]!.adjusted.bias).toBeCloseTo(5 / 40, 15);
    for (const r of out) expect(accuracySummarySchema.safeParse(r).success).toBe(true);
  });

  it('replaces a re-scored week instead of counting it twice', () => {
    const batch = { location: 'DC-SOUTH', lead: 0, weekStart: '2026-03-02', series: [s('COLA-1L', 10, 8, 9, 2)] };
    const once = recordWeek(emptyScorecard(), batch).state;
    const twice = recordWeek(once, { ...batch, series: [s('COLA-1L', 12, 8, 9, 2)] }).state;
    const [r] = summarise(twice, { location: 'DC-SOUTH', throughWeek: '2026-03-09' }).filter((x) => x.volumeBand === 'all');
    expect(r!.seriesWeeks).toBe(1);
    expect(r!.baseline.wape).toBeCloseTo(4 / 12, 15);
  });

  it('does not change the state it was given', () => {
    const empty = emptyScorecard();
    const before = JSON.stringify(empty);
    recordWeek(empty, { location: 'DC-COAST', lead: 2, weekStart: '2026-03-02', series: [s('A', 1, 1, 1, 1)] });
    expect(JSON.stringify(empty)).toBe(before);
  });

  it('leaves out series without a baseline or with bad numbers, each with a reason', () => {
    const { rejected } = recordWeek(emptyScorecard(), {
      location: 'DC-NORTH',
      lead: 0,
      weekStart: '2026-03-02',
      series: [s('NEW-ITEM', 5, null, 4, 1), s('BAD', -1, 2, 2, 1), s('BAND', 5, 5, 5, 1, 6, 4)],
    });
    expect(rejected.map((r) => r.item)).toEqual(['NEW-ITEM', 'BAD', 'BAND']);
    expect(rejected[0]!.reason).toMatch(/no baseline/);
    expect(rejected[1]!.reason).toMatch(/actual must be finite and ≥ 0/);
    expect(rejected[2]!.reason).toMatch(/p10 ≤ p90/);
  });

  it('keeps only the latest weeks and summarises the window up to the given week', () => {
    let st = emptyScorecard(3);
    const weeks = ['2026-01-05', '2026-01-12', '2026-01-19', '2026-01-26', '2026-02-02'];
    weeks.forEach((w, i) => {
      st = recordWeek(st, { location: 'DC-NORTH', lead: 1, weekStart: w, series: [s('A', 10, 10 + i, 10, 20)] }).state;
    });
    expect(Object.keys(st.locations['DC-NORTH']!['1']!)).toEqual(weeks.slice(2));
    const e = weeklyErrors(st, 'DC-NORTH', 1, '2026-01-26', 13);
    expect(e.map((x) => x.weekStart)).toEqual(['2026-01-19', '2026-01-26']);
    expect(e.map((x) => x.absErrorBaseline)).toEqual([2, 3]);
    const [all] = summarise(st, { location: 'DC-NORTH', throughWeek: '2026-02-02', windowWeeks: 2 }).filter((r) => r.volumeBand === 'all');
    expect(all!.weeksScored).toBe(2);
    expect(all!.baseline.wape).toBeCloseTo((3 + 4) / 20, 15);
  });

  it('survives a JSON round trip and carries the self-check flag and evidence', () => {
    let st = emptyScorecard();
    let sc = emptySelfCheck();
    const weeks = ['2026-01-05', '2026-01-12', '2026-01-19', '2026-01-26', '2026-02-02', '2026-02-09', '2026-02-16'];
    weeks.forEach((w, i) => {
      // Baseline off by 5 every week, sensing by 10–16.
      st = recordWeek(st, { location: 'DC-NORTH', lead: 0, weekStart: w, series: [s('A', 100, 105, 110 + i, 20)] }).state;
      sc = evaluateSelfCheck(sc, { location: 'DC-NORTH', lead: 0, throughWeek: w, weeks: weeklyErrors(st, 'DC-NORTH', 0, w) }).state;
    });
    const restored = JSON.parse(JSON.stringify(st)) as typeof st;
    const out = summarise(restored, { location: 'DC-NORTH', throughWeek: '2026-02-16', selfCheck: JSON.parse(JSON.stringify(sc)) as typeof sc });
    expect(out.every((r) => r.fallbackActive)).toBe(true);
    expect(out[0]!.selfCheck!.weeks).toBe(7);
    expect(out[0]!.fva).toBeLessThan(0);
  });

  it('names a bad location or week', () => {
    expect(() => recordWeek(emptyScorecard(), { location: 'DC NORTH', lead: 0, weekStart: '2026-03-02', series: [] })).toThrow(/location/);
    expect(() => recordWeek(emptyScorecard(), { location: 'DC-NORTH', lead: 0, weekStart: '2026-02-30', series: [] })).toThrow(/weekStart/);
  });
});
