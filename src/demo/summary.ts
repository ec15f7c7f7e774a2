import type { Alert } from '../contracts/alert.ts';
import type { Plan, PlanLead } from '../contracts/plan.ts';

// The demo's printed summary: per centre, the latest plan's weeks 0–4 against the baseline, the biggest moves with
// their reason in words, and the alerts that still need someone, with what to check. Plain text, our own layout.

const fmt = (n: number) => Math.round(n).toLocaleString('en-GB');
const pct = (a: number, b: number) => (b === 0 ? (a === 0 ? '   0.0%' : '    new') : `${a >= b ? '+' : ''}${((100 * (a - b)) / b).toFixed(1)}%`.padStart(7));

/** Why one lead's adjusted number differs from its baseline, in a planner's words. */
export function reasonOf(lead: PlanLead): string {
  const e = lead.explanation;
  const parts: string[] = [];
  if (e.fallback) parts.push(`fallback ${e.fallback}`);
  if (e.guardrail === 'order-book-floor') parts.push(`held up by the order book (${fmt(e.survivingOrderBook)} expected to survive of ${fmt(e.orderBook)} booked)`);
  else if (e.guardrail) parts.push(`capped by the ${e.guardrail} guardrail`);
  if (e.coverage !== null && Math.abs(e.coverage - 1) >= 0.15) parts.push(`order book at ${e.coverage.toFixed(2)}× its usual level for this point`);
  if (e.recentRatio !== null && Math.abs(e.recentRatio - 1) >= 0.1) parts.push(`recent weeks ran at ${e.recentRatio.toFixed(2)}× the baseline`);
  if (Math.abs(e.locationFactor - 1) >= 0.03) parts.push(`location-wide factor ${e.locationFactor.toFixed(2)}`);
  if (Math.abs(e.seriesFactor - 1) >= 0.05) parts.push(`series factor ${e.seriesFactor.toFixed(2)} (evidence weight ${e.seriesEvidenceWeight.toFixed(2)})`);
  const top = [...e.terms].sort((a, b) => Math.abs(b.contribution) - Math.abs(a.contribution))[0];
  if (top && parts.length === 0 && Math.abs(top.contribution) > 0.01) parts.push(`${top.name} contributes ${top.contribution >= 0 ? '+' : ''}${top.contribution.toFixed(2)} to the ratio`);
  if (parts.length === 0) parts.push(e.notes[0] ?? 'within the noise of the series: stays near its baseline');
  return parts.join('; ');
}

export interface CentreSummaryInput {
  readonly location: string;
  readonly timeZone: string;
  readonly plans: readonly Plan[];
  readonly alerts: readonly Alert[];
}

const SEVERITY = { high: 0, medium: 1, low: 2 } as const;

function subject(a: Alert): string {
  if (a.item === '*') return 'whole centre';
  if (a.item.startsWith('*customer:')) return `customer ${a.item.slice('*customer:'.length)}`;
  return a.item;
}

export function summariseCentre(input: CentreSummaryInput, options: { moves?: number; alerts?: number } = {}): string {
  const lines: string[] = [];
  const planDate = input.plans.reduce((d, p) => (p.planDate > d ? p.planDate : d), '');
  const plans = input.plans.filter((p) => p.planDate === planDate);
  lines.push(`${input.location} (${input.timeZone}) — plan of ${planDate || 'none yet'}, ${plans.length} series`);
  if (plans.length === 0) return lines.join('\n');

  const weeks = new Map<string, { baseline: number; adjusted: number; lead: number }>();
  for (const p of plans) {
    for (const l of p.leads) {
      const w = weeks.get(l.weekStart) ?? { baseline: 0, adjusted: 0, lead: l.lead };
      w.baseline += l.baseline ?? 0;
      w.adjusted += l.adjusted;
      weeks.set(l.weekStart, w);
    }
  }
  lines.push('  lead  week of       baseline    adjusted   change');
  for (const [weekStart, w] of [...weeks].sort((a, b) => (a[0] < b[0] ? -1 : 1))) {
    lines.push(`  ${String(w.lead).padStart(4)}  ${weekStart}  ${fmt(w.baseline).padStart(10)}  ${fmt(w.adjusted).padStart(10)}  ${pct(w.adjusted, w.baseline)}`);
  }

  const moves = plans
    .flatMap((p) => p.leads.map((l) => ({ item: p.item, lead: l, delta: l.adjusted - (l.baseline ?? 0) })))
    .filter((m) => m.lead.baseline !== null && Math.abs(m.delta) >= 1)
    .sort((a, b) => Math.abs(b.delta) - Math.abs(a.delta) || (a.item < b.item ? -1 : 1))
    .slice(0, options.moves ?? 5);
  lines.push('  biggest moves:');
  if (moves.length === 0) lines.push('    none — every series stays on its baseline');
  for (const m of moves) {
    lines.push(`    ${m.item} lead ${m.lead.lead} (${m.lead.weekStart}): ${fmt(m.lead.baseline!)} → ${fmt(m.lead.adjusted)} (${pct(m.lead.adjusted, m.lead.baseline!).trim()})`);
    lines.push(`      why: ${reasonOf(m.lead)}`);
  }

  const open = input.alerts
    .filter((a) => a.state !== 'resolved')
    .sort((a, b) => SEVERITY[a.severity] - SEVERITY[b.severity] || (a.delivery === b.delivery ? 0 : a.delivery === 'page' ? -1 : 1) || (b.valueAtRisk ?? 0) - (a.valueAtRisk ?? 0) || (a.alertId < b.alertId ? -1 : 1))
    .slice(0, options.alerts ?? 5);
  lines.push(`  alerts needing attention: ${input.alerts.filter((a) => a.state !== 'resolved').length}`);
  for (const a of open) {
    lines.push(`    [${a.severity}] ${a.rule} ${subject(a)} since ${a.episodeStart} (${a.state}, ${a.delivery})`);
    lines.push(`      ${a.message}`);
    lines.push(`      check: ${a.whatToCheck}`);
  }
  const weekAgo = new Date(Date.parse(`${planDate}T00:00:00Z`) - 7 * 86_400_000).toISOString().slice(0, 10);
  const resolved = input.alerts.filter((a) => a.state === 'resolved' && a.changedOn > weekAgo).sort((a, b) => SEVERITY[a.severity] - SEVERITY[b.severity] || (a.alertId < b.alertId ? -1 : 1));
  if (resolved.length > 0) {
    lines.push(`  resolved in the last week: ${resolved.length}`);
    for (const a of resolved.slice(0, options.alerts ?? 5)) lines.push(`    ${a.rule} ${subject(a)} (${a.episodeStart} to ${a.changedOn}): ${a.message}`);
  }
  return lines.join('\n');
}
