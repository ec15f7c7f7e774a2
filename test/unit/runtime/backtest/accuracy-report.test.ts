import { describe, expect, it } from 'vitest';
import type { Plan } from '../../../../src/contracts/plan.ts';
import { AccuracyReporter } from '../../../../src/runtime/backtest/accuracy-report.ts';

// The backtest's accuracy.json, worked out by hand: WAPE = Σ|f − a| / Σa, bias = Σ(f − a) / Σa, FVA = (WAPE of
// the baseline − WAPE of the adjusted plan) / WAPE of the baseline; a week's actual is the lead-0 actual-to-date of
// its last plan, and a week is scored at the first close after it.

type Lead = { lead: number; weekStart: string; adjusted: number; baseline: number | null; actualToDate?: number };
const plan = (item: string, planDate: string, revision: number, leads: Lead[]): Plan =>
  ({ location: 'DC-NORTE', item, planDate, revision, leads: leads.map((l) => ({ actualToDate: 0, ...l })) }) as unknown as Plan;

describe('AccuracyReporter', () => {
  it('scores every plan at every lead against the week’s last actual, next to the baseline', () => {
    const r = new AccuracyReporter();
    // Weeks start on Mondays: 2026-06-29, 07-06, 07-13.
    r.add(plan('COLA-330', '2026-07-01', 1, [
      { lead: 0, weekStart: '2026-06-29', adjusted: 10, baseline: 12, actualToDate: 4 },
      { lead: 1, weekStart: '2026-07-06', adjusted: 20, baseline: 15 },
    ]));
    r.add(plan('COLA-330', '2026-07-03', 1, [
      { lead: 0, weekStart: '2026-06-29', adjusted: 11, baseline: 12, actualToDate: 9 },
      { lead: 1, weekStart: '2026-07-06', adjusted: 18, baseline: 15 },
    ]));
    // A series without a baseline for the week: its pair is counted apart, not scored.
    r.add(plan('TONIC-200', '2026-07-03', 1, [{ lead: 0, weekStart: '2026-06-29', adjusted: 5, baseline: null, actualToDate: 6 }]));
    // The Monday close scores week 06-29 (actual 9); its restatement (revision 2) replaces the first revision.
    r.add(plan('COLA-330', '2026-07-06', 1, [
      { lead: 0, weekStart: '2026-07-06', adjusted: 17, baseline: 15, actualToDate: 3 },
      { lead: 1, weekStart: '2026-07-13', adjusted: 16, baseline: null },
    ]));
    r.add(plan('COLA-330', '2026-07-06', 2, [
      { lead: 0, weekStart: '2026-07-06', adjusted: 19, baseline: 15, actualToDate: 3 },
      { lead: 1, weekStart: '2026-07-13', adjusted: 16.5, baseline: null },
    ]));
    r.add(plan('COLA-330', '2026-07-10', 1, [
      { lead: 0, weekStart: '2026-07-06', adjusted: 21, baseline: 15, actualToDate: 20 },
      { lead: 1, weekStart: '2026-07-13', adjusted: 14, baseline: 13 },
    ]));
    // Scores week 07-06 (actual 20); week 07-13 has no close after it and stays unscored.
    r.add(plan('COLA-330', '2026-07-13', 1, [{ lead: 0, weekStart: '2026-07-13', adjusted: 14, baseline: 13 }]));

    const report = r.report();
    expect(report.locations.map((l) => l.location)).toEqual(['DC-NORTE']);
    const [lead0, lead1] = report.locations[0]!.leads;
    // Lead 0: (10, 12 | 9), (11, 12 | 9), (19, 15 | 20), (21, 15 | 20). Adjusted |errors| 1+2+1+1 = 5, errors
    // +1+2−1+1 = 3; baseline |errors| 3+3+5+5 = 16, errors 3+3−5−5 = −4; Σ actual 58.
    expect(lead0).toMatchObject({ lead: 0, weeksScored: 2, seriesWeeks: 2, pairs: 4, pairsWithoutBaseline: 1 });
    expect(lead0!.adjusted.wape).toBeCloseTo(5 / 58, 12);
    expect(lead0!.adjusted.bias).toBeCloseTo(3 / 58, 12);
    expect(lead0!.baseline.wape).toBeCloseTo(16 / 58, 12);
    expect(lead0!.baseline.bias).toBeCloseTo(-4 / 58, 12);
    expect(lead0!.fva).toBeCloseTo(11 / 16, 12);
    // Lead 1: (20, 15 | 20), (18, 15 | 20): adjusted 2/40 and −2/40, baseline 10/40 and −10/40, FVA 0.8.
    expect(lead1).toMatchObject({ lead: 1, weeksScored: 1, seriesWeeks: 1, pairs: 2, pairsWithoutBaseline: 0 });
    expect(lead1!.adjusted.wape).toBeCloseTo(0.05, 12);
    expect(lead1!.adjusted.bias).toBeCloseTo(-0.05, 12);
    expect(lead1!.baseline.wape).toBeCloseTo(0.25, 12);
    expect(lead1!.baseline.bias).toBeCloseTo(-0.25, 12);
    expect(lead1!.fva).toBeCloseTo(0.8, 12);
  });

  it('keeps locations apart: a close at one does not score the weeks of another', () => {
    const r = new AccuracyReporter();
    r.add({ ...plan('COLA-330', '2026-07-03', 1, [{ lead: 0, weekStart: '2026-06-29', adjusted: 10, baseline: 10, actualToDate: 8 }]), location: 'DC-SUL' } as Plan);
    r.add(plan('COLA-330', '2026-07-06', 1, [{ lead: 0, weekStart: '2026-07-06', adjusted: 10, baseline: 10 }]));
    expect(r.report().locations.map((l) => l.location)).toEqual([]);
    r.add({ ...plan('COLA-330', '2026-07-06', 1, [{ lead: 0, weekStart: '2026-07-06', adjusted: 10, baseline: 10 }]), location: 'DC-SUL' } as Plan);
    const sul = r.report().locations;
    expect(sul.map((l) => l.location)).toEqual(['DC-SUL']);
    expect(sul[0]!.leads[0]).toMatchObject({ pairs: 1, adjusted: { wape: 0.25, bias: 0.25 } });
  });
});
