import { weekStartOf } from '../calendar/weeks.ts';
import type { LocationState } from './location-state.ts';
import { forgetKeptSignalsReading } from './as-of-cache.ts';
import { judgedRowFlags } from './line-parts.ts';
import { reindexSeries, type SeriesState } from './series-state.ts';

export interface PruneResult {
  readonly lineRows: number;
  readonly shipments: number;
  readonly baselineVersions: number;
  readonly series: number;
}

/**
 * Drops what can no longer change any plan or training row: lines whose every revision lies (by requested date
 * and by knowledge time) before the retention window, shipments likewise, baseline versions superseded before it,
 * and baseline weeks before it. Event ids go with their rows. The series' first activity is remembered
 * (`prunedFirst…`). What the rows left are judged to be can still change (first fills, large lines, both judged
 * against earlier lines): the kept signals that read such a row are forgotten, the rest stay exact.
 */
export function pruneLocationState(state: LocationState, asOfDay: number): PruneResult {
  const cutoff = weekStartOf(asOfDay, state.calendar.weekStart) - 7 * state.retentionWeeks;
  let lineRows = 0;
  let shipments = 0;
  let baselineVersions = 0;
  let series = 0;
  // Latest requested day of a remaining row whose parts' flags the prune changed (see as-of-cache.ts).
  let rejudgedUpTo = -Infinity;
  for (const [item, s] of state.series) {
    const L = s.lines.cols;
    const liveLines = new Set<number>();
    for (let i = 0; i < s.lines.length; i++) {
      if (L.requestedDay[i]! >= cutoff || L.knownDay[i]! >= cutoff) liveLines.add(L.lineHash[i]!);
    }
    const keptRows: number[] = [];
    for (let i = 0; i < s.lines.length; i++) {
      if (liveLines.has(L.lineHash[i]!)) keptRows.push(i);
      else if (L.quantity[i]! > 0) s.prunedFirstRequested = Math.min(s.prunedFirstRequested, L.requestedDay[i]!);
    }
    // Flags depend on the earlier lines and on the baseline versions known then: judged again only when either goes.
    const linesBefore = s.lines.length;
    const judgedBefore = linesBefore > 0 ? judgedRowFlags(s) : undefined;
    let baselinesCut = false;
    lineRows += s.lines.filter((i) => liveLines.has(L.lineHash[i]!));
    const S = s.shipments.cols;
    const liveShipment = (i: number) => S.shipDay[i]! >= cutoff || S.knownDay[i]! >= cutoff;
    for (let i = 0; i < s.shipments.length; i++) if (!liveShipment(i)) s.prunedFirstShipped = Math.min(s.prunedFirstShipped, S.shipDay[i]!);
    shipments += s.shipments.filter(liveShipment);

    let current = -1;
    for (const b of s.baselines) if (b.knownDay <= cutoff && b.version > current) current = b.version;
    const before = s.baselines.length;
    const kept = s.baselines.filter((b) => b.version >= current || b.knownDay >= cutoff);
    for (const b of kept) {
      // Weeks before the window go. A superseded version keeps the rest of its horizon: rebasing a week's baseline
      // onto a later version weighs the two over their first common weeks, which can lie well past its supersession.
      let from = 0;
      while (from < b.weeks.length && b.weeks[from]! < cutoff) from++;
      if (from > 0) {
        baselinesCut = true;
        b.weeks = b.weeks.slice(from);
        b.quantities = b.quantities.slice(from);
      }
    }
    s.baselines.length = 0;
    s.baselines.push(...kept.filter((b) => b.weeks.length > 0 || b.knownDay >= cutoff));
    baselineVersions += before - s.baselines.length;
    baselinesCut ||= s.baselines.length < before;
    reindexSeries(s);
    if (keptRows.length > 0 && (keptRows.length < linesBefore || baselinesCut)) rejudgedUpTo = Math.max(rejudgedUpTo, rejudged(s, judgedBefore, keptRows));
    if (s.lines.length === 0 && s.shipments.length === 0 && s.baselines.length === 0) {
      state.series.delete(item);
      series++;
    }
  }
  for (const d of state.closedDays) if (d < cutoff) state.closedDays.delete(d);
  compactCustomers(state);
  forgetKeptSignalsReading(state, rejudgedUpTo);
  return { lineRows, shipments, baselineVersions, series };
}

function compactCustomers(state: LocationState): void {
  const used = new Set<number>();
  for (const s of state.series.values()) for (let i = 0; i < s.lines.length; i++) used.add(s.lines.cols.customer[i]!);
  if (used.size >= state.customers.length) return;
  const remap = new Map<number, number>();
  const names: string[] = [];
  state.customers.forEach((c, i) => {
    if (used.has(i)) {
      remap.set(i, names.length);
      names.push(c);
    }
  });
  for (const s of state.series.values()) {
    const col = s.lines.cols.customer;
    for (let i = 0; i < s.lines.length; i++) col[i] = col[i]! < 0 ? -1 : remap.get(col[i]!)!;
  }
  state.customers.length = 0;
  state.customers.push(...names);
  state.customerIndex.clear();
  names.forEach((c, i) => state.customerIndex.set(c, i));
}

/** Latest requested day of a remaining line row whose flags changed (+Infinity when the flags before are unknown). */
function rejudged(s: SeriesState, before: ReturnType<typeof judgedRowFlags>, keptRows: readonly number[]): number {
  if (!before) return Infinity;
  const after = judgedRowFlags(s)!.flags;
  const req = s.lines.cols.requestedDay;
  let latest = -Infinity;
  for (let i = 0; i < keptRows.length; i++) if (after[i] !== before.flags[keptRows[i]!] && req[i]! > latest) latest = req[i]!;
  return latest;
}
