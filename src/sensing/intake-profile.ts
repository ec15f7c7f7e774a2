import { isoWeekday } from '../calendar/day-number.ts';
import { weekStartOf } from '../calendar/weeks.ts';
import type { SeriesParts } from './line-parts.ts';
import type { RecomputeContext } from './recompute-context.ts';

/**
 * How a week's demand is ordered over time: share of a target week's final demand ordered on weekday wd of the
 * week L weeks before it (index L·8 + wd), over the complete weeks of the lookback. It turns a weekly plan into the
 * order intake expected on a given day: Σ_L share(L, weekday) × plan(week + L).
 */
export interface IntakeProfile {
  readonly ordered: Float64Array; // (maxLead + 1) × 8, quantities
  readonly demand: number;
}

export function intakeProfile(parts: SeriesParts, ctx: RecomputeContext): IntakeProfile {
  const s = ctx.settings;
  const ordered = new Float64Array((s.maxLead + 1) * 8);
  const lo = ctx.week0 - 7 * s.lookbackWeeks;
  const hi = ctx.week0; // exclusive: complete weeks only
  let demand = 0;
  for (let i = 0; i < parts.n; i++) {
    if (parts.knownMs[i]! > ctx.cutoffMs) break;
    const req = parts.requestedDay[i]!;
    if (req < lo || req >= hi) continue;
    const q = parts.quantity[i]!;
    demand += q;
    const od = parts.orderedDay[i]!;
    const L = Math.round((weekStartOf(req, ctx.cal.weekStart) - weekStartOf(od, ctx.cal.weekStart)) / 7);
    if (L < 0 || L > s.maxLead) continue;
    const cell = L * 8 + isoWeekday(od);
    ordered[cell] = ordered[cell]! + q;
  }
  return { ordered, demand };
}

/** Share for (lead, weekday), pulled toward the location's with `priorUnits` of pseudo-demand. */
export function intakeShare(own: IntakeProfile, pooled: IntakeProfile, lead: number, weekday: number, priorUnits: number): number {
  const cell = lead * 8 + weekday;
  const pooledShare = pooled.demand > 0 ? pooled.ordered[cell]! / pooled.demand : 0;
  const denom = own.demand + priorUnits;
  return denom > 0 ? (own.ordered[cell]! + priorUnits * pooledShare) / denom : pooledShare;
}
