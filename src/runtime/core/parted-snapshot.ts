import type { ScorecardState } from '../../accuracy/scorecard.ts';
import type { SelfCheckState } from '../../accuracy/self-check.ts';
import type { MonitorState } from '../../monitoring/index.ts';
import { isSeriesTail, joinTail, type SeriesSnapshot } from './series-tail.ts';
import type { WeekLedger } from './week-ledger.ts';

// The core engine's state saved in parts, so a batch writes only what changed: per series its sensing rows
// (`s:<item>`, bulky, changed by facts and the weekly prune) and its close-time state (`c:<item>`: monitoring's
// series state, the previous plan, the week ledger; changed at every close), plus one base entry for the rest.

/** Keys of the per-series parts. `s:` holds the rows after the last full save `f:` (see series-tail.ts). */
export const S = 's:';
export const F = 'f:';
export const C = 'c:';

/** What a previous plan contributes to the next close (movement, plan-implied intake): its weeks' adjusted numbers. */
export type PreviousPlans = Record<string, [string, number][]>;

export interface PartedBase {
  sensing: { series: unknown[] } & Record<string, unknown>;
  monitor: MonitorState;
  /** Monitoring walks its series in insertion order; a restore keeps that order. */
  monitorOrder: string[];
  ledgerWeek: string | null;
  scorecard: ScorecardState;
  selfCheck: SelfCheckState;
  lastClosed: string | null;
  late: Record<string, { date: string; quantity: number }[]>;
  /** Day number of a close whose weekly prune has not run yet (absent when none waits). */
  pruneDue?: number;
}

export type ClosePart = { m: MonitorState['series'][string] | null; p: [string, number][] | null; l: WeekLedger['series'][string] | null };

/** Puts the saved parts back together into whole snapshots (still to be restored by sensing and monitoring). */
export function assembleParts(base: PartedBase, parts: ReadonlyMap<string, unknown>) {
  const series: { item: string }[] = [];
  for (const [k, v] of parts) {
    if (!k.startsWith(S) || v === null) continue;
    // A part written before full saves existed holds the whole series.
    if (!isSeriesTail(v)) {
      series.push(v as { item: string });
      continue;
    }
    const full = parts.get(`${F}${k.slice(S.length)}`);
    if (full === undefined || full === null) throw new Error(`series part ${k} has rows after a full save that is missing`);
    series.push(joinTail(full as SeriesSnapshot, v));
  }
  series.sort((a, b) => (a.item < b.item ? -1 : a.item > b.item ? 1 : 0));
  const close = new Map([...parts].filter(([k, v]) => k.startsWith(C) && v !== null).map(([k, v]) => [k.slice(C.length), v as ClosePart]));
  const monitorSeries: MonitorState['series'] = {};
  for (const item of [...base.monitorOrder, ...[...close.keys()].sort()]) {
    const m = close.get(item)?.m;
    if (m && !(item in monitorSeries)) monitorSeries[item] = m;
  }
  const previous: PreviousPlans = {};
  const ledger: WeekLedger = { series: {}, lastWeek: base.ledgerWeek };
  for (const [item, c] of [...close].sort((a, b) => (a[0] < b[0] ? -1 : 1))) {
    if (c.p) previous[item] = c.p;
    if (c.l) ledger.series[item] = c.l;
  }
  return {
    sensing: { ...base.sensing, series },
    monitor: { ...base.monitor, series: monitorSeries },
    previous,
    ledger,
    scorecard: base.scorecard,
    selfCheck: base.selfCheck,
    lastClosed: base.lastClosed,
    late: base.late,
  };
}
