import type { Alert, AlertRule } from '../contracts/alert.ts';
import { alertIdOf, recordChange } from './alert-record.ts';
import { openLifecycle, step, type LifecycleEvent, type Severity, type Step } from './lifecycle.ts';
import type { MonitoringSettings } from './settings.ts';
import type { AlertEntry, Direction, Measure, MonitorState, Scope } from './state.ts';

// The working state of one call: a private copy of the monitoring state, the date, and the records produced so far.
// Every state change of an alert goes through `apply` or `open`, so each yields exactly one record.

export interface DayContext {
  readonly state: MonitorState;
  readonly on: string;
  readonly settings: MonitoringSettings;
  readonly records: Alert[];
}

export function newContext(state: MonitorState, on: string, settings: MonitoringSettings): DayContext {
  return { state, on, settings, records: [] };
}

export interface NewAlert {
  readonly scope: Scope;
  readonly rule: AlertRule;
  readonly item: string;
  readonly location?: string;
  readonly customer: string | null;
  readonly direction: Direction | null;
  readonly episodeStart: string;
  readonly severity: Severity;
  readonly measure: Measure;
  readonly members: string[];
}

export function openAlert(ctx: DayContext, spec: NewAlert): AlertEntry {
  const location = spec.location ?? ctx.state.location;
  let alertId = alertIdOf(location, spec.item, spec.rule, spec.episodeStart);
  // An estimated start can coincide with an older episode's; the identity must stay unique, so today's date wins.
  if (ctx.state.alerts[alertId]) alertId = alertIdOf(location, spec.item, spec.rule, ctx.on);
  const entry: AlertEntry = {
    alertId,
    scope: spec.scope,
    rule: spec.rule,
    location,
    item: spec.item,
    customer: spec.customer,
    direction: spec.direction,
    episodeStart: alertId.split('|')[3]!,
    life: openLifecycle(ctx.on, spec.severity),
    seq: 0,
    delivery: 'digest',
    changedBy: null,
    lastChange: 'opened',
    measure: { ...spec.measure },
    firedRules: [spec.rule],
    members: [...spec.members],
    groupId: null,
  };
  ctx.state.alerts[alertId] = entry;
  ctx.records.push(recordChange(entry, entry.life, 'opened', ctx.on, null));
  return entry;
}

/** Runs one lifecycle event; publishes a record when it changed the alert. */
export function apply(ctx: DayContext, entry: AlertEntry, event: LifecycleEvent, by: string | null = null): Step {
  const result = step(entry.life, event, ctx.settings.lifecycle);
  if (result.change !== null) ctx.records.push(recordChange(entry, result.next, result.change, event.on, by));
  else entry.life = result.next;
  return result;
}

/** Publishes a change that is not a lifecycle transition (a group's members). */
export function publish(ctx: DayContext, entry: AlertEntry, change: 'members-changed'): void {
  ctx.records.push(recordChange(entry, entry.life, change, ctx.on, null));
}
