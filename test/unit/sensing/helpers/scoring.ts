import type { SenseResult } from '../../../../src/sensing/sense-location.ts';

/** Sums behind WAPE and band coverage for a group of (plan, actual) pairs. */
export interface Score {
  absAdjusted: number;
  absBaseline: number;
  actual: number;
  inBand: number;
  n: number;
}

export const emptyScore = (): Score => ({ absAdjusted: 0, absBaseline: 0, actual: 0, inBand: 0, n: 0 });

/**
 * Adds every lead of every plan whose week has an actual. Band coverage counts an actual strictly inside
 * (p10, p90) as 1 and one equal to an end as ½ (ties split half in, half out, as issue 3 asks).
 */
export function score(result: SenseResult, actuals: Map<string, Map<string, number>>, key: (item: string, lead: number) => string | null, into: Map<string, Score>): void {
  for (const plan of result.plans) {
    for (const l of plan.leads) {
      const a = actuals.get(plan.item)?.get(l.weekStart);
      const k = key(plan.item, l.lead);
      if (a === undefined || l.baseline === null || k === null) continue;
      const s = into.get(k) ?? emptyScore();
      s.absAdjusted += Math.abs(l.adjusted - a);
      s.absBaseline += Math.abs(l.baseline - a);
      s.actual += a;
      const lo = l.quantiles.p10!;
      const hi = l.quantiles.p90!;
      s.inBand += a > lo && a < hi ? 1 : a === lo || a === hi ? 0.5 : 0;
      s.n++;
      into.set(k, s);
    }
  }
}

export const wapeRatio = (s: Score) => s.absAdjusted / s.absBaseline;
export const coverage = (s: Score) => s.inBand / s.n;
