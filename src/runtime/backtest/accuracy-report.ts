import type { Plan } from '../../contracts/plan.ts';
import { addDays } from '../local-day.ts';
import { bias, fva, wape } from '../../accuracy/measures.ts';

// Backtest self-check: every plan published for a week, at every lead, scored against that week's actual, next to
// the baseline known at the same lead. A week's actual is the lead-0 actual-to-date of the last plan published for
// it (its last business day's close, restatements included); a week is scored once a close after it happened.

/** WAPE and bias (src/accuracy/measures.ts); null where the actuals sum to zero. */
export interface Score {
  readonly wape: number | null;
  readonly bias: number | null;
}

const score = (forecast: number[], actual: number[]): Score => ({ wape: wape(forecast, actual), bias: bias(forecast, actual) });

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

type Cell = { actual: number[]; adjusted: number[]; baseline: number[]; weeks: Set<string>; series: Set<string>; missing: number };

export class AccuracyReporter {
  private readonly pending = new Map<string, Pending[]>();
  private readonly actuals = new Map<string, WeekActual>();
  private readonly latestPlanDate = new Map<string, string>();
  private readonly cells = new Map<string, Map<number, Cell>>();

  add(plan: Plan): void {
    for (const lead of plan.leads) {
      const key = `${plan.location}|${plan.item}|${lead.weekStart}`;
      let list = this.pending.get(key);
      if (!list) this.pending.set(key, (list = []));
      const i = list.findIndex((p) => p.lead === lead.lead && p.planDate === plan.planDate);
      const entry = { lead: lead.lead, planDate: plan.planDate, revision: plan.revision, adjusted: lead.adjusted, baseline: lead.baseline };
      if (i < 0) list.push(entry);
      else if (list[i]!.revision < plan.revision) list[i] = entry;
      if (lead.lead === 0) {
        const a = this.actuals.get(key);
        if (!a || a.planDate < plan.planDate || (a.planDate === plan.planDate && a.revision < plan.revision)) {
          this.actuals.set(key, { planDate: plan.planDate, revision: plan.revision, value: lead.actualToDate });
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
    for (const [key, list] of this.pending) {
      const [loc, item, week] = key.split('|') as [string, string, string];
      if (loc !== location || addDays(week, 7) > planDate) continue;
      const actual = this.actuals.get(key);
      if (actual) for (const p of list) this.cell(loc, p.lead, week, item, p, actual.value);
      this.pending.delete(key);
      this.actuals.delete(key);
    }
  }

  private cell(location: string, lead: number, week: string, item: string, p: Pending, actual: number): void {
    let byLead = this.cells.get(location);
    if (!byLead) this.cells.set(location, (byLead = new Map()));
    let c = byLead.get(lead);
    if (!c) byLead.set(lead, (c = { actual: [], adjusted: [], baseline: [], weeks: new Set(), series: new Set(), missing: 0 }));
    if (p.baseline === null) {
      c.missing++;
      return;
    }
    c.actual.push(actual);
    c.adjusted.push(p.adjusted);
    c.baseline.push(p.baseline);
    c.weeks.add(week);
    c.series.add(`${item}|${week}`);
  }

  report(): AccuracyReport {
    const locations = [...this.cells.keys()].sort().map((location) => {
      const byLead = this.cells.get(location)!;
      const leads = [...byLead.keys()].sort((a, b) => a - b).map((lead): LeadAccuracy => {
        const c = byLead.get(lead)!;
        const baseline = score(c.baseline, c.actual);
        const adjusted = score(c.adjusted, c.actual);
        return {
          lead,
          weeksScored: c.weeks.size,
          seriesWeeks: c.series.size,
          pairs: c.actual.length,
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
