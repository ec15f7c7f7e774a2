import type { Plan } from '../../contracts/plan.ts';
import { addDays } from '../local-day.ts';
import { addError, biasOf, emptyErrorSums, fva, wapeOf, type ErrorSums } from '../../accuracy/measures.ts';

// Backtest self-check: every plan published for a week, at every lead, scored against that week's actual, next to
// the baseline known at the same lead. A week's actual is the lead-0 actual-to-date of the last plan published for
// it (its last business day's close, restatements included); a week is scored once a close after it happened.

/** WAPE and bias (src/accuracy/measures.ts); null where the actuals sum to zero. */
export interface Score {
  readonly wape: number | null;
  readonly bias: number | null;
}

const score = (sums: ErrorSums): Score => ({ wape: wapeOf(sums), bias: biasOf(sums) });

interface Pending {
  lead: number;
  planDate: string;
  revision: number;
  adjusted: number;
  baseline: number | null;
}

interface WeekActual {
  planDate: string;
  revision: number;
  value: number;
}

/** What a series has been promised for one week: the plans at every lead, and the week's actual so far. */
interface SeriesWeek {
  readonly pending: Pending[];
  actual?: WeekActual;
}

export interface LeadAccuracy {
  readonly lead: number;
  readonly weeksScored: number;
  readonly seriesWeeks: number;
  /** Plan records scored (each plan date counts once per series and lead). */
  readonly pairs: number;
  /** Pairs left out because the series had no baseline for the week. */
  readonly pairsWithoutBaseline: number;
  readonly baseline: Score;
  readonly adjusted: Score;
  /** (WAPE baseline − WAPE adjusted) / WAPE baseline; positive = sensing helps. */
  readonly fva: number | null;
}

export interface AccuracyReport {
  readonly schemaVersion: 'nearcast.backtest-accuracy.v1';
  readonly locations: readonly { readonly location: string; readonly leads: readonly LeadAccuracy[] }[];
}

// Running sums, not the pairs themselves: a backtest of 100k series scores tens of millions of pairs.
type Cell = { adjusted: ErrorSums; baseline: ErrorSums; pairs: number; weeks: Set<string>; seriesWeeks: number; missing: number };

export class AccuracyReporter {
  /** Per location, the weeks not scored yet (by week start), each with its series. */
  private readonly pending = new Map<string, Map<string, Map<string, SeriesWeek>>>();
  private readonly latestPlanDate = new Map<string, string>();
  private readonly cells = new Map<string, Map<number, Cell>>();

  add(plan: Plan): void {
    let weeks = this.pending.get(plan.location);
    if (!weeks) this.pending.set(plan.location, (weeks = new Map()));
    for (const lead of plan.leads) {
      let items = weeks.get(lead.weekStart);
      if (!items) weeks.set(lead.weekStart, (items = new Map()));
      let week = items.get(plan.item);
      if (!week) items.set(plan.item, (week = { pending: [] }));
      const list = week.pending;
      const i = list.findIndex((p) => p.lead === lead.lead && p.planDate === plan.planDate);
      const entry = { lead: lead.lead, planDate: plan.planDate, revision: plan.revision, adjusted: lead.adjusted, baseline: lead.baseline };
      if (i < 0) list.push(entry);
      else if (list[i]!.revision < plan.revision) list[i] = entry;
      if (lead.lead === 0) {
        const a = week.actual;
        if (!a || a.planDate < plan.planDate || (a.planDate === plan.planDate && a.revision < plan.revision)) {
          week.actual = { planDate: plan.planDate, revision: plan.revision, value: lead.actualToDate };
        }
      }
    }
    const prev = this.latestPlanDate.get(plan.location);
    if (!prev || prev < plan.planDate) {
      this.latestPlanDate.set(plan.location, plan.planDate);
      this.scoreCompleted(plan.location, plan.planDate);
    }
  }

  /** Scores every pending week of `location` that ended before `planDate`. */
  private scoreCompleted(location: string, planDate: string): void {
    const weeks = this.pending.get(location)!;
    for (const [week, items] of weeks) {
      if (addDays(week, 7) > planDate) continue;
      for (const { pending, actual } of items.values()) {
        if (!actual) continue;
        for (const p of pending) this.cell(location, p, week, actual.value);
        // A series-week counts once per lead it was scored at.
        const leads = new Set(pending.filter((p) => p.baseline !== null).map((p) => p.lead));
        for (const lead of leads) this.cellOf(location, lead).seriesWeeks++;
      }
      weeks.delete(week);
    }
  }

  private cellOf(location: string, lead: number): Cell {
    let byLead = this.cells.get(location);
    if (!byLead) this.cells.set(location, (byLead = new Map()));
    let c = byLead.get(lead);
    if (!c) byLead.set(lead, (c = { adjusted: emptyErrorSums(), baseline: emptyErrorSums(), pairs: 0, weeks: new Set(), seriesWeeks: 0, missing: 0 }));
    return c;
  }

  private cell(location: string, p: Pending, week: string, actual: number): void {
    const c = this.cellOf(location, p.lead);
    if (p.baseline === null) {
      c.missing++;
      return;
    }
    addError(c.adjusted, p.adjusted, actual);
    addError(c.baseline, p.baseline, actual);
    c.pairs++;
    c.weeks.add(week);
  }

  report(): AccuracyReport {
    const locations = [...this.cells.keys()].sort().map((location) => {
      const byLead = this.cells.get(location)!;
      const leads = [...byLead.keys()].sort((a, b) => a - b).map((lead): LeadAccuracy => {
        const c = byLead.get(lead)!;
        const baseline = score(c.baseline);
        const adjusted = score(c.adjusted);
        return {
          lead,
          weeksScored: c.weeks.size,
          seriesWeeks: c.seriesWeeks,
          pairs: c.pairs,
          pairsWithoutBaseline: c.missing,
          baseline,
          adjusted,
          fva: fva(baseline.wape, adjusted.wape),
        };
      });
      return { location, leads };
    });
    return { schemaVersion: 'nearcast.backtest-accuracy.v1', locations };
  }
}
