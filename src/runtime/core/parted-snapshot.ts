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

const byName = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);

/**
 * Puts the saved parts back together into whole snapshots (still to be restored by sensing and monitoring). The
 * series come as an iterable read once, in item order, each part read from `parts` only when its series is due, so
 * a restore need not hold every series' parsed parts at once (see parsed-parts.ts).
 */
export function assembleParts(base: PartedBase, parts: ReadonlyMap<string, unknown>) {
  const keys = [...parts.keys()];
  const seriesItems = keys.filter((k) => k.startsWith(S)).map((k) => k.slice(S.length)).sort(byName);
  function* series(): Generator<{ item: string }> {
    for (const item of seriesItems) {
      const v = parts.get(`${S}${item}`);
      if (v === null || v === undefined) continue;
      // A part written before full saves existed holds the whole series.
      if (!isSeriesTail(v)) {
        yield v as { item: string };
        continue;
      }
      const full = parts.get(`${F}${item}`);
      if (full === undefined || full === null) throw new Error(`series part ${S}${item} has rows after a full save that is missing`);
      yield joinTail(full as SeriesSnapshot, v);
    }
  }
  const close = new Map<string, ClosePart>();
  for (const k of keys.filter((key) => key.startsWith(C)).sort(byName)) {
    const v = parts.get(k);
    if (v !== null && v !== undefined) close.set(k.slice(C.length), v as ClosePart);
  }
  const monitorSeries: MonitorState['series'] = {};
  // `close` is in item order already.
  for (const item of [...base.monitorOrder, ...close.keys()]) {
    const m = close.get(item)?.m;
    if (m && !(item in monitorSeries)) monitorSeries[item] = m;
  }
  const previous: PreviousPlans = {};
  const ledger: WeekLedger = { series: {}, lastWeek: base.ledgerWeek };
  for (const [item, c] of close) {
    if (c.p) previous[item] = c.p;
    if (c.l) ledger.series[item] = c.l;
  }
  return {
    sensing: { ...base.sensing, series: series() },
    monitor: { ...base.monitor, series: monitorSeries },
    previous,
    ledger,
    scorecard: base.scorecard,
    selfCheck: base.selfCheck,
    lastClosed: base.lastClosed,
    late: base.late,
  };
}
