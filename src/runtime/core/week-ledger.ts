import type { Plan } from '../../contracts/plan.ts';
import type { SeriesWeekScore } from '../../accuracy/scorecard.ts';

// What the runtime must remember to score a week once it is complete: per week and series, the first plan
// published for that week at each lead (the plan of the week's first close L weeks earlier: one fixed point in the
// cycle per lead, so every week is scored alike), and the latest lead-0 actual-to-date per series. Compact JSON,
// because it travels in every changelog snapshot of the location.

/** [lead, adjusted, baseline, p10, p90, baselineVersion] */
export type LeadEntry = [number, number, number | null, number | null, number | null, number | null];

/** One series' part of the ledger (kept with the series, so it is saved with it). */
export interface SeriesLedger {
  /** weekStart → first published entry per lead. */
  pending: Record<string, LeadEntry[]>;
  /** weekStart → [actualToDate, meanUnitsPerDay] of its latest lead-0 plan for that week. */
  actual: Record<string, [number, number]>;
}

export interface WeekLedger {
  /** item → its ledger. */
  series: Record<string, SeriesLedger>;
  /** Week of the latest close. */
  lastWeek: string | null;
}

export function emptyLedger(): WeekLedger {
  return { series: {}, lastWeek: null };
}

const of = (ledger: WeekLedger, item: string): SeriesLedger => (ledger.series[item] ??= { pending: {}, actual: {} });

/** Remembers the first publication of each (week, lead) per series. */
export function notePlans(ledger: WeekLedger, plans: readonly Plan[], meanPerDay: ReadonlyMap<string, number>): void {
  for (const p of plans) {
    const own = of(ledger, p.item);
    for (const l of p.leads) {
      const entries = (own.pending[l.weekStart] ??= []);
      if (entries.some((e) => e[0] === l.lead)) continue;
      entries.push([l.lead, l.adjusted, l.baseline, l.quantiles.p10 ?? null, l.quantiles.p90 ?? null, l.explanation.baselineVersion]);
    }
    noteActual(ledger, p, meanPerDay.get(p.item));
  }
}

/** Keeps the latest lead-0 actual-to-date (restatements included: late data raises it). */
export function noteActual(ledger: WeekLedger, plan: Plan, meanPerDay: number | undefined): void {
  const lead0 = plan.leads.find((l) => l.lead === 0);
  if (!lead0) return;
  const own = of(ledger, plan.item);
  own.actual[lead0.weekStart] = [lead0.actualToDate, meanPerDay ?? own.actual[lead0.weekStart]?.[1] ?? 0];
}

export interface CompletedWeek {
  readonly weekStart: string;
  /** Per lead, the series scores of the week. */
  readonly byLead: ReadonlyMap<number, SeriesWeekScore[]>;
  /** Per item: actual and the entries, for monitoring's weekClosed. */
  readonly series: ReadonlyMap<string, { actual: number; entries: readonly LeadEntry[] }>;
}

/**
 * Called at each close with the close's week: returns the weeks that completed since the last close (those before
 * `week`) with their scores, and forgets them. A series without a lead-0 plan in the week has no actual and is not
 * scored.
 */
export function completeWeeks(ledger: WeekLedger, week: string): CompletedWeek[] {
  const byWeek = new Map<string, { byLead: Map<number, SeriesWeekScore[]>; series: Map<string, { actual: number; entries: readonly LeadEntry[] }> }>();
  for (const item of Object.keys(ledger.series).sort()) {
    const own = ledger.series[item]!;
    const weeks = new Set([...Object.keys(own.pending), ...Object.keys(own.actual)]);
    for (const weekStart of [...weeks].sort()) {
      if (weekStart >= week) break;
      const a = own.actual[weekStart];
      const entries = own.pending[weekStart] ?? [];
      delete own.pending[weekStart];
      delete own.actual[weekStart];
      if (!a) continue;
      let done = byWeek.get(weekStart);
      if (!done) byWeek.set(weekStart, (done = { byLead: new Map(), series: new Map() }));
      done.series.set(item, { actual: a[0], entries });
      for (const [lead, adjusted, baseline, p10, p90] of entries) {
        const list = done.byLead.get(lead) ?? [];
        list.push({ item, actual: a[0], baseline, adjusted, p10, p90, meanUnitsPerDay: a[1] });
        done.byLead.set(lead, list);
      }
    }
    if (Object.keys(own.pending).length === 0 && Object.keys(own.actual).length === 0) delete ledger.series[item];
  }
  ledger.lastWeek = week;
  return [...byWeek.keys()].sort().map((weekStart) => ({ weekStart, ...byWeek.get(weekStart)! }));
}
