import { LAG_UNKNOWN, PART_FIRST_FILL, PART_LARGE, type SeriesParts } from './line-parts.ts';
import { FRESH_ARRAYS, type ScratchArrays } from './arena.ts';
import type { RecomputeContext } from './recompute-context.ts';

/**
 * One series at one recompute: quantities per week and knowledge cut-point (see RecomputeContext), cumulative so
 * that `at(arr, p, j)` is "what was known of week p by cut j". All sums run over parts in knowledge order, so the
 * same records give bit-identical numbers in any arrival order.
 */
export interface SeriesFrame {
  /** Demand-basis quantity (orders by requested date, or shipments by ship date), large lines excluded. */
  readonly demand: Float64Array;
  /** Large lines' part of the demand (orders basis). */
  readonly demandLarge: Float64Array;
  /** Order book by (shifted) requested date, large lines excluded, and large lines' part. */
  readonly book: Float64Array;
  readonly bookLarge: Float64Array;
  /** Lead 0 at cut maxLead: known so far (actual to date + booked rest) excluding and only large lines; to date alone. */
  readonly known0: Float64Array;
  readonly known0Large: Float64Array;
  readonly toDate0: Float64Array;
  /** Final quantity of lines already booked at the cut of each lead (for survival), by week × lead. */
  readonly survivingBooked: Float64Array;
  /** First-fill orders' quantity (excluded from run-rates), cumulative by cut like `book`. */
  readonly firstFill: Float64Array;
  /** Weeks with a censored shipment day judged by the as-of instant (shipments basis); see censoredAsOf. */
  readonly censored: Uint8Array;
  /** Days judged censored (shipments basis), each from what was known censorGraceDays after it. */
  readonly censoredDay: Uint8Array;
  /** Final demand by day (large lines included) and order intake by order date, by frame day. */
  readonly dayDemand: Float64Array;
  readonly dayIntake: Float64Array;
  /** Earliest demand date (requested date, or ship date on the shipments basis) known, null when none. */
  readonly firstActivityDay: number | null;
  /** Earliest knowledge day among records already in the state but known after the as-of instant (∞ if none). */
  readonly knownAfterCutoffDay: number;
}

export function cutStride(ctx: RecomputeContext): number {
  return ctx.NC + 1;
}

/** Cumulative value of week position p at cut j (j = ctx.NC: everything known by the as-of instant). */
export function at(arr: Float64Array, ctx: RecomputeContext, p: number, j: number): number {
  return arr[p * (ctx.NC + 1) + Math.min(j, ctx.NC)]!;
}

/** Whether week p had a censored day judged by as-of day `asOfDay` (what a plan made that day could know). */
export function censoredAsOf(f: SeriesFrame, ctx: RecomputeContext, p: number, asOfDay: number): boolean {
  if (f.censored[p] === 0) return false;
  const grace = ctx.settings.censorGraceDays;
  for (let d = 7 * p; d < 7 * p + 7 && ctx.firstDay + d + grace <= asOfDay; d++) if (f.censoredDay[d]) return true;
  return false;
}

/** Cut-point of a record known on day kd, for a week whose cut 0 is day c0 (a plain function: runs per part). */
function cutOf(c0: number, kd: number, NC: number): number {
  if (kd <= c0) return 0;
  const j = Math.ceil((kd - c0) / 7);
  return j >= NC ? NC : j;
}

/** What a prune remembered of the dropped rows' first activity (see SeriesState). */
export interface PrunedFirst {
  readonly prunedFirstRequested: number;
  readonly prunedFirstShipped: number;
}

const NOTHING_PRUNED: PrunedFirst = { prunedFirstRequested: Infinity, prunedFirstShipped: Infinity };

export function buildSeriesFrame(
  parts: SeriesParts,
  ctx: RecomputeContext,
  lagDays: number,
  arrays: ScratchArrays = FRESH_ARRAYS,
  pruned: PrunedFirst = NOTHING_PRUNED,
): SeriesFrame {
  const { nWeeks, NC, firstDay, nDays, k, cutoffMs } = ctx;
  const maxLead = ctx.settings.maxLead;
  const shipBasis = ctx.settings.demandBasis === 'shipments';
  const S = NC + 1;
  const book = arrays.f64(nWeeks * S);
  const bookLarge = arrays.f64(nWeeks * S);
  const demand = shipBasis ? arrays.f64(nWeeks * S) : book;
  const demandLarge = shipBasis ? arrays.f64(nWeeks * S) : bookLarge;
  const known0 = arrays.f64(nWeeks);
  const known0Large = arrays.f64(nWeeks);
  const toDate0 = arrays.f64(nWeeks);
  const survivingBooked = arrays.f64(nWeeks * (maxLead + 1));
  const firstFill = arrays.f64(nWeeks * S);
  const censored = arrays.u8(nWeeks);
  const censoredDay = arrays.u8(nDays);
  const grace = ctx.settings.censorGraceDays;
  // What a day's censoring is judged from: orders due and shipments known by the end of day + grace.
  const dueJudged = arrays.f64(shipBasis ? nDays : 0);
  const shippedJudged = arrays.f64(shipBasis ? nDays : 0);
  const dayDemand = arrays.f64(nDays);
  const dayIntake = arrays.f64(nDays);
  const dayDue = shipBasis ? arrays.f64(nDays) : dayDemand;
  const prunedFirst = shipBasis ? pruned.prunedFirstShipped : pruned.prunedFirstRequested;
  let firstActivity: number | null = Number.isFinite(prunedFirst) ? prunedFirst : null;
  let knownAfterCutoffDay = Infinity;

  const shift = shipBasis && lagDays !== LAG_UNKNOWN ? lagDays : 0;
  for (let i = 0; i < parts.n; i++) {
    if (parts.knownMs[i]! > cutoffMs) {
      knownAfterCutoffDay = parts.knownDay[i]!;
      break; // knowledge order: nothing later counts
    }
    const q = parts.quantity[i]!;
    const kd = parts.knownDay[i]!;
    const od = parts.orderedDay[i]! - firstDay;
    if (od >= 0 && od < nDays) dayIntake[od] = dayIntake[od]! + q;
    const req = parts.requestedDay[i]!;
    if (!shipBasis && q > 0 && (firstActivity === null || req < firstActivity)) firstActivity = req;
    const rd = req - firstDay;
    if (rd >= 0 && rd < nDays) {
      dayDue[rd] = dayDue[rd]! + q;
      if (shipBasis && kd <= req + grace) dueJudged[rd] = dueJudged[rd]! + q;
    }
    const d = req + shift - firstDay;
    if (d < 0 || d >= nDays) continue;
    const p = (d / 7) | 0;
    const large = (parts.flags[i]! & PART_LARGE) !== 0;
    const j = cutOf(firstDay + 7 * p + k - 7 * maxLead, kd, NC);
    const bookArr = large ? bookLarge : book;
    bookArr[p * S + j] = bookArr[p * S + j]! + q;
    const knownArr = large ? known0Large : known0;
    const c = firstDay + 7 * p + k;
    if (kd <= c) {
      if (!shipBasis) {
        knownArr[p] = knownArr[p]! + q;
        if (!large && d + firstDay <= c) toDate0[p] = toDate0[p]! + q;
      } else if (d + firstDay > c) knownArr[p] = knownArr[p]! + q;
    }
    const first = parts.firstKnownDay[i]!;
    const sb = p * (maxLead + 1);
    for (let L = 0; L <= maxLead; L++) if (first <= c - 7 * L) survivingBooked[sb + L] = survivingBooked[sb + L]! + q;
    if (!large && (parts.flags[i]! & PART_FIRST_FILL) !== 0) firstFill[p * S + j] = firstFill[p * S + j]! + q;
  }

  if (shipBasis) {
    const sh = parts.shipments;
    for (let i = 0; i < sh.n; i++) {
      if (sh.knownMs[i]! > cutoffMs) {
        knownAfterCutoffDay = Math.min(knownAfterCutoffDay, sh.knownDay[i]!);
        break;
      }
      const q = sh.quantity[i]!;
      const d = sh.shipDay[i]! - firstDay;
      if (firstActivity === null || sh.shipDay[i]! < firstActivity) firstActivity = sh.shipDay[i]!;
      if (d < 0 || d >= nDays) continue;
      dayDemand[d] = dayDemand[d]! + q;
      if (sh.knownDay[i]! <= sh.shipDay[i]! + grace) shippedJudged[d] = shippedJudged[d]! + q;
      const p = (d / 7) | 0;
      const cell = p * S + cutOf(firstDay + 7 * p + k - 7 * maxLead, sh.knownDay[i]!, NC);
      demand[cell] = demand[cell]! + q;
      const c = firstDay + 7 * p + k;
      if (sh.knownDay[i]! <= c && d + firstDay <= c) {
        known0[p] = known0[p]! + q;
        toDate0[p] = toDate0[p]! + q;
      }
    }
    const share = ctx.settings.censorShortShare;
    // Judged from the day's own knowledge window, not from all that is known now: a shipment or line arriving weeks
    // later must not turn a day censored after the fact (features of past as-of days would see the future).
    for (let d = 0; d < nDays; d++) {
      if (firstDay + d + grace > ctx.planDay) break; // not judged yet
      if (dueJudged[d]! > 0 && shippedJudged[d]! < share * dueJudged[d]!) {
        censoredDay[d] = 1;
        censored[(d / 7) | 0] = 1;
      }
    }
  }

  for (const arr of shipBasis ? [book, bookLarge, firstFill, demand, demandLarge] : [book, bookLarge, firstFill]) {
    for (let p = 0; p < nWeeks; p++) for (let j = 1; j < S; j++) arr[p * S + j] = arr[p * S + j]! + arr[p * S + j - 1]!;
  }
  return { demand, demandLarge, book, bookLarge, known0, known0Large, toDate0, survivingBooked, firstFill, censored, censoredDay, dayDemand, dayIntake, firstActivityDay: firstActivity, knownAfterCutoffDay };
}
