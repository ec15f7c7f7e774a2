import type { RecomputeContext } from './recompute-context.ts';
import { censoredAsOf } from './series-frame.ts';
import { rebasedWeekBaseline, type SeriesInput } from './series-input.ts';

// What one series' recent complete weeks say at as-of day j (plan date − 7j), using only what was known that day:
// weekly ratios of demand to the rebased baseline, the recency-weighted recent ratio, the typical order-book
// build-up by lead (at the as-of weekday), and the sums the small-series exact test needs.

export interface RecentWindow {
  /** Weekly ratio by age (0 = newest complete week), NaN where the week is not usable. */
  readonly ratios: number[];
  /** Rebased baseline by age (NaN where unusable). */
  readonly baselines: number[];
  /** Recency-weighted ratio of sums; NaN without a usable week. */
  readonly recentRatio: number;
  readonly sumW: number;
  readonly sumW2: number;
  readonly usableWeeks: number;
  /** Recency-weighted sums behind the typical order-book build-up: booked by the as-of weekday at each lead, the
   * weeks' demand, and (lead 0) the demand dated up to the as-of weekday. */
  readonly bookedSum: number[];
  readonly bookWeeksWeight: number;
  readonly demandSum: number;
  readonly toDateSum: number;
  /** Small-series test: demand and rebased baseline summed over the test window. */
  readonly testDemand: number;
  readonly testBaseline: number;
  /** Run-rate: recency-weighted weekly demand without first-fill orders; weeks behind it. */
  readonly runRate: number;
  readonly runRateWeeks: number;
  /** Complete weeks since the series' first activity, as of that day. */
  readonly historyWeeks: number;
}

export function recentWindow(input: SeriesInput, ctx: RecomputeContext, j: number): RecentWindow {
  const s = ctx.settings;
  const maxLead = s.maxLead;
  const f = input.frame;
  const newestAge0 = ctx.k === 6 ? 0 : 1; // the as-of week itself is complete on its last day
  // Small plain arrays: typed arrays this size cost more to allocate and collect than they save.
  const ratios: number[] = new Array(s.recentWeeks).fill(NaN);
  const baselines: number[] = new Array(s.recentWeeks).fill(NaN);
  const bookedSum: number[] = new Array(maxLead + 1).fill(0);
  let num = 0;
  let den = 0;
  let sumW = 0;
  let sumW2 = 0;
  let usable = 0;
  let demandSum = 0;
  let toDateSum = 0;
  let bookW = 0;
  let testDemand = 0;
  let testBaseline = 0;
  let rrNum = 0;
  let rrDen = 0;
  let rrWeeks = 0;
  const asOfDay = ctx.planDay - 7 * j;
  const first = f.firstActivityDay;
  const windows = Math.max(s.recentWeeks, s.bookProfileWeeks, s.smallSeriesWeeks, s.runRateWeeks);
  // Cumulative frame columns read inline (see `at` in series-frame.ts): this loop runs per series × as-of × week.
  const NC = ctx.NC;
  const stride = NC + 1;
  const demandCol = f.demand;
  const bookCol = f.book;
  for (let age = 0; age < windows; age++) {
    const m = age + newestAge0;
    const p = ctx.H - j - m;
    if (p < 0) break;
    const weekDay = ctx.firstDay + 7 * p;
    if (first === null || weekDay + 6 < first) continue; // before the series existed
    const cut = p * stride + Math.min(maxLead + m, NC);
    const demand = demandCol[cut]!;
    const ordinary = ctx.holidayLoss[p] === 0 && !censoredAsOf(f, ctx, p, asOfDay);
    if (age < s.runRateWeeks && ordinary) {
      const w = ctx.recentWeight[age]!;
      rrNum += w * Math.max(0, demand - f.firstFill[cut]!); // first fills as known that day, like the demand
      rrDen += w;
      rrWeeks++;
    }
    if (!ordinary) continue;
    const b = rebasedWeekBaseline(input, p, j);
    if (age < s.smallSeriesWeeks && b > 0) {
      testDemand += demand;
      testBaseline += b;
    }
    if (age < s.bookProfileWeeks && demand > 0) {
      const w = ctx.halfLifeWeight[age]!;
      for (let L = 0; L <= maxLead; L++) {
        const booked = L === 0 ? f.known0[p]! : bookCol[p * stride + Math.min(maxLead - L, NC)]!;
        bookedSum[L] = bookedSum[L]! + w * Math.min(booked, demand * 2);
      }
      toDateSum += w * f.toDate0[p]!;
      demandSum += w * demand;
      bookW += w;
    }
    if (age < s.recentWeeks && b > 0) {
      const w = ctx.recentWeight[age]!;
      ratios[age] = demand / b;
      baselines[age] = b;
      num += w * demand;
      den += w * b;
      sumW += w;
      sumW2 += w * w;
      usable++;
    }
  }
  const historyWeeks = first === null ? 0 : Math.max(0, Math.floor((ctx.week0 - 7 * j - first) / 7) + (ctx.k === 6 ? 1 : 0));
  return {
    ratios,
    baselines,
    recentRatio: den > 0 ? num / den : NaN,
    sumW,
    sumW2,
    usableWeeks: usable,
    bookWeeksWeight: bookW,
    bookedSum,
    demandSum,
    toDateSum,
    testDemand,
    testBaseline,
    runRate: rrDen > 0 ? rrNum / rrDen : NaN,
    runRateWeeks: rrWeeks,
    historyWeeks: asOfDay < (first ?? Infinity) ? 0 : historyWeeks,
  };
}
