import { weekStartOf } from '../calendar/weeks.ts';
import { forgetKeptSignals } from './as-of-cache.ts';
import type { LocationState } from './location-state.ts';
import { reindexSeries } from './series-state.ts';

export interface PruneResult {
  readonly lineRows: number;
  readonly shipments: number;
  readonly baselineVersions: number;
  readonly series: number;
}

/**
 * Drops what can no longer change any plan or training row: lines whose every revision lies (by requested date
 * and by knowledge time) before the retention window, shipments likewise, baseline versions superseded before it,
 * and baseline weeks before it. Event ids go with their rows.
 */
export function pruneLocationState(state: LocationState, asOfDay: number): PruneResult {
  forgetKeptSignals(state);
  const cutoff = weekStartOf(asOfDay, state.calendar.weekStart) - 7 * state.retentionWeeks;
  let lineRows = 0;
  let shipments = 0;
  let baselineVersions = 0;
  let series = 0;
  for (const [item, s] of state.series) {
    const L = s.lines.cols;
    const liveLines = new Set<number>();
    for (let i = 0; i < s.lines.length; i++) {
      if (L.requestedDay[i]! >= cutoff || L.knownDay[i]! >= cutoff) liveLines.add(L.lineHash[i]!);
    }
    lineRows += s.lines.filter((i) => liveLines.has(L.lineHash[i]!));
    const S = s.shipments.cols;
    shipments += s.shipments.filter((i) => S.shipDay[i]! >= cutoff || S.knownDay[i]! >= cutoff);

    let current = -1;
    for (const b of s.baselines) if (b.knownDay <= cutoff && b.version > current) current = b.version;
    const before = s.baselines.length;
    const kept = s.baselines.filter((b) => b.version >= current || b.knownDay >= cutoff);
    for (const b of kept) {
      // A version superseded on day S is still the one in force for as-of days before S; it needs weeks up to a
      // few leads beyond S, not its whole horizon.
      let supersededDay = Infinity;
      for (const o of kept) if (o.version > b.version && o.knownDay < supersededDay) supersededDay = o.knownDay;
      const keep: number[] = [];
      for (let i = 0; i < b.weeks.length; i++) if (b.weeks[i]! >= cutoff && b.weeks[i]! <= supersededDay + 63) keep.push(i);
      if (keep.length !== b.weeks.length) {
        b.weeks = Int32Array.from(keep.map((i) => b.weeks[i]!));
        b.quantities = Float64Array.from(keep.map((i) => b.quantities[i]!));
      }
    }
    s.baselines.length = 0;
    s.baselines.push(...kept.filter((b) => b.weeks.length > 0 || b.knownDay >= cutoff));
    baselineVersions += before - s.baselines.length;
    reindexSeries(s);
    if (s.lines.length === 0 && s.shipments.length === 0 && s.baselines.length === 0) {
      state.series.delete(item);
      series++;
    }
  }
  for (const d of state.closedDays) if (d < cutoff) state.closedDays.delete(d);
  compactCustomers(state);
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
