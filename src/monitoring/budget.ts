import type { Alert, AlertChange } from '../contracts/alert.ts';
import type { DayContext } from './day-context.ts';
import { severityRank } from './lifecycle.ts';

// The page budget: at most N pages per location and day, the most important first (feed health, then severity,
// then value at risk); everything else goes to the daily digest. Only a change that asks for attention pages.

const PAGING: ReadonlySet<AlertChange> = new Set(['opened', 'reopened', 'escalated', 'snooze-ended']);
const FEED_RULES = new Set(['feed-stalled', 'day-not-closed']);

export interface BudgetOutcome {
  readonly paged: number;
  /** Records sent to the digest instead: over budget, or covered by a group alert. */
  readonly overBudget: string[];
  readonly grouped: string[];
}

/** Decides delivery for the records produced since `fromIndex`; `used` pages of the date were spent already. */
export function applyBudget(ctx: DayContext, fromIndex: number, used: number): BudgetOutcome {
  const todays = ctx.records.slice(fromIndex);
  const lastPaging = new Map<string, Alert>();
  for (const r of todays) if (PAGING.has(r.change)) lastPaging.set(r.alertId, r);
  const grouped: string[] = [];
  const eligible: Alert[] = [];
  for (const r of lastPaging.values()) {
    const entry = ctx.state.alerts[r.alertId]!;
    if (entry.groupId !== null) grouped.push(r.alertId);
    else eligible.push(r);
  }
  const price = medianPrice(eligible);
  const rank = (r: Alert): number => r.valueAtRisk ?? (r.unitsAtRisk ?? 0) * price;
  eligible.sort(
    (a, b) =>
      Number(FEED_RULES.has(b.rule)) - Number(FEED_RULES.has(a.rule)) ||
      severityRank(b.severity) - severityRank(a.severity) ||
      rank(b) - rank(a) ||
      (a.alertId < b.alertId ? -1 : 1),
  );
  const budget = Math.max(0, ctx.settings.budget.pagesPerLocationDay - used);
  const overBudget: string[] = [];
  eligible.forEach((r, i) => {
    const entry = ctx.state.alerts[r.alertId]!;
    entry.delivery = i < budget ? 'page' : 'digest';
    if (i >= budget) overBudget.push(r.alertId);
  });
  for (const id of grouped) ctx.state.alerts[id]!.delivery = 'digest';
  // Every record of today carries the routing its alert ended the day with (grouping came after the opening).
  for (const r of todays) {
    const entry = ctx.state.alerts[r.alertId];
    if (!entry) continue;
    r.delivery = entry.delivery;
    r.groupId = entry.groupId;
  }
  return { paged: Math.min(budget, eligible.length), overBudget, grouped };
}

// Ranks unpriced alerts among priced ones by the typical price of the day's priced alerts.
function medianPrice(records: readonly Alert[]): number {
  const prices = records
    .filter((r) => r.valueAtRisk !== null && r.unitsAtRisk !== null && r.unitsAtRisk > 0)
    .map((r) => r.valueAtRisk! / r.unitsAtRisk!)
    .sort((a, b) => a - b);
  return prices.length === 0 ? 1 : prices[Math.floor(prices.length / 2)]!;
}
