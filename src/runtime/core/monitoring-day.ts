import { createLocationCalendar, weekOfDate } from '../../calendar/index.ts';
import type { Location } from '../../contracts/location.ts';
import type { ManifestModel } from '../../contracts/manifest.ts';
import type { Plan } from '../../contracts/plan.ts';
import type { DayInput, SeriesDay } from '../../monitoring/index.ts';
import type { MonitoringInput } from '../../sensing/index.ts';
import type { DayFacts } from '../location-model-port.ts';
import type { CompletedWeek } from './week-ledger.ts';

// Builds monitoring's day input from what sensing returned at the close and what the runtime knows about the feed.

export interface DayParts {
  readonly master: Location;
  readonly plans: readonly Plan[];
  readonly model: readonly ManifestModel[];
  readonly inputs: readonly MonitoringInput[];
  readonly facts: DayFacts;
  /** Weeks completed since the previous close (monitoring scores the baseline at its fixed lead). */
  readonly completed: readonly CompletedWeek[];
  readonly monitoredLead: number;
  /** Late facts applied since the previous close, per item: (local date, quantity). */
  readonly late: ReadonlyMap<string, readonly { date: string; quantity: number }[]>;
}

export function monitoringDayInput(d: DayParts): DayInput {
  const plans = new Map(d.plans.map((p) => [p.item as string, p]));
  const phi = new Map((d.model[0]?.dispersion ?? []).map((x) => [x.band, x.phi]));
  const lastCompleted = d.completed.at(-1);
  const series: SeriesDay[] = d.inputs.map((m) => {
    const plan = plans.get(m.item);
    const lead = plan?.leads.find((l) => l.lead === d.monitoredLead);
    const casePack = d.master.items?.[m.item]?.casePack;
    const dispersion = phi.get(m.volumeBand);
    const closed = lastCompleted?.series.get(m.item);
    const atLead = closed?.entries.find((e) => e[0] === d.monitoredLead);
    const late = d.late.get(m.item);
    return {
      item: m.item,
      intake: m.intake,
      expectedFromPlan: m.expectedIntakeFromPlan,
      expectedFromBaseline: m.expectedIntakeFromBaseline,
      baselineVersion: plan?.leads[0]?.explanation.baselineVersion ?? null,
      ...(m.unitPrice !== undefined ? { unitPrice: m.unitPrice } : {}),
      ...(casePack !== undefined && casePack > 0 ? { casePack } : {}),
      ...(dispersion !== undefined && Number.isFinite(dispersion) ? { dispersion } : {}),
      ...(m.byCustomer.length > 0 ? { byCustomer: m.byCustomer.map((c) => ({ customer: c.customer, intake: c.intake })) } : {}),
      ...(late && late.length > 0 ? { lateIntake: late.slice(0, 400).map((l) => ({ ...l })) } : {}),
      ...(lead && lead.baseline !== null
        ? {
            planLead: {
              lead: lead.lead,
              weekStart: lead.weekStart,
              baseline: lead.baseline,
              adjusted: lead.adjusted,
              lower: Math.min(lead.quantiles.p10 ?? lead.adjusted, lead.quantiles.p90 ?? lead.adjusted),
              upper: Math.max(lead.quantiles.p10 ?? lead.adjusted, lead.quantiles.p90 ?? lead.adjusted),
            },
          }
        : {}),
      ...(closed && atLead && atLead[2] !== null
        ? {
            weekClosed: {
              weekStart: lastCompleted!.weekStart,
              lead: d.monitoredLead,
              actual: closed.actual,
              baselineAtLead: atLead[2],
              baselineVersionAtLead: atLead[5],
              adjustedAtLead: atLead[1],
            },
          }
        : {}),
    };
  });
  const date = d.facts.planDate;
  return {
    location: d.master.location,
    date,
    weekStart: weekOfDate(createLocationCalendar(d.master), date),
    timeZone: d.master.timeZone,
    isHoliday: d.master.holidays?.some((h) => h.date === date && h.kind === 'reduced') ?? false,
    series,
    feed: {
      closedBy: d.facts.closedBy,
      ownDeadline: d.facts.ownDeadline,
      closeMs: d.facts.closeMs,
      lastRecordMs: d.facts.lastRecordMs,
      stalledDuringDay: d.facts.feedStalled,
      ...(d.master.businessHours ? { businessHours: d.master.businessHours } : {}),
    },
  };
}
