import { isoWeekday } from '../calendar/day-number.ts';
import { dayCapacity } from '../calendar/location-calendar.ts';
import type { VolumeBand } from '../stats/volume-band.ts';
import { intakeShare, type IntakeProfile } from './intake-profile.ts';
import type { SeriesParts } from './line-parts.ts';
import type { RecomputeContext } from './recompute-context.ts';

/** What deviation monitoring needs per series for the closed day. */
export interface MonitoringInput {
  readonly item: string;
  readonly date: string;
  /** Quantity ordered on this local date (by orderedAt), as known at the as-of moment. */
  readonly intake: number;
  /** Intake the plan published before the day implied for it, and the intake the baseline implied. */
  readonly expectedIntakeFromPlan: number;
  readonly expectedIntakeFromBaseline: number;
  readonly unitPrice?: number;
  readonly byCustomer: ReadonlyArray<{ readonly customer: string; readonly intake: number }>;
  /** Mean units per business day behind the series' volume band, and the band. */
  readonly meanPerDay: number;
  readonly volumeBand: VolumeBand;
}

/** The day's intake, in total and by customer (customers in name order; lines without a customer are left out). */
export function dayIntake(parts: SeriesParts, ctx: RecomputeContext, customers: readonly string[]) {
  let total = 0;
  const by = new Map<number, number>();
  for (let i = 0; i < parts.n; i++) {
    if (parts.knownMs[i]! > ctx.cutoffMs) break;
    if (parts.orderedDay[i] !== ctx.planDay) continue;
    const q = parts.quantity[i]!;
    total += q;
    const c = parts.customer[i]!;
    if (c >= 0) by.set(c, (by.get(c) ?? 0) + q);
  }
  const byCustomer = [...by.entries()]
    .map(([c, intake]) => ({ customer: customers[c]!, intake }))
    .filter((e) => Math.abs(e.intake) > 1e-9)
    .sort((a, b) => (a.customer < b.customer ? -1 : a.customer > b.customer ? 1 : 0));
  return { total: Math.max(0, total), byCustomer };
}

/** Σ_L share(L, weekday of the day) × quantity planned for week L, scaled by the day's capacity. */
export function expectedIntake(
  weekly: ReadonlyArray<number | null>,
  own: IntakeProfile,
  pooled: IntakeProfile,
  ctx: RecomputeContext,
  priorUnits: number,
): number {
  const wd = isoWeekday(ctx.planDay);
  let e = 0;
  for (let L = 0; L < weekly.length; L++) {
    const q = weekly[L];
    if (q === null || q === undefined) continue;
    e += intakeShare(own, pooled, L, wd, priorUnits) * q;
  }
  return e * dayCapacity(ctx.cal, ctx.planDay, ctx.settings.reducedDayShare);
}
