import type { Alert } from '../contracts/alert.ts';
import type { ErrorCode } from '../errors.ts';
import { applyBudget } from './budget.ts';
import { applyCommandTo, type CommandOutcome } from './commands.ts';
import { newContext } from './day-context.ts';
import { alertCommandSchema, feedCheckSchema, issuesOf, type Issue } from './day-input.ts';
import { localDateOf } from './dates.ts';
import { assessStall, stallWouldChange } from './feed-alerts.ts';
import { DEFAULT_MONITORING_SETTINGS, type MonitoringSettings } from './settings.ts';
import type { MonitorState } from './state.ts';

// What happens between two closes: a feed-health check (written into the event log by the runtime, so a replay sees
// the same checks) and a planner's command. Both change alerts; neither touches the day's statistics.

export interface IntradayResult {
  readonly state: MonitorState;
  readonly alerts: Alert[];
  readonly outcome: 'applied' | 'duplicate' | 'ignored' | 'refused' | 'rejected';
  readonly refused?: { readonly code: ErrorCode; readonly message: string };
  readonly issues?: readonly Issue[];
}

/** A feed-health check during the day. Checks of a day already closed, or of a non-business day, change nothing. */
export function checkFeed(state: MonitorState, input: unknown, settings: MonitoringSettings = DEFAULT_MONITORING_SETTINGS): IntradayResult {
  const parsed = feedCheckSchema.safeParse(input);
  if (!parsed.success) return { state, alerts: [], outcome: 'rejected', issues: issuesOf(parsed.error) };
  const f = parsed.data;
  if (f.location !== state.location) return { state, alerts: [], outcome: 'rejected', issues: [{ path: 'location', message: `is ${f.location}, not ${state.location}` }] };
  const date = localDateOf(f.atMs, f.timeZone);
  if (!f.isBusinessDay || (state.lastDate !== null && date <= state.lastDate)) return { state, alerts: [], outcome: 'ignored' };
  const facts = {
    date,
    atMs: f.atMs,
    lastRecordMs: f.lastRecordMs,
    timeZone: f.timeZone,
    ...(f.businessHours ? { businessHours: f.businessHours } : {}),
    ...(f.recordsPerHour !== undefined ? { recordsPerHour: f.recordsPerHour } : {}),
  };
  if (!stallWouldChange(state, facts, settings)) return { state, alerts: [], outcome: 'duplicate' };
  const work = structuredClone(state);
  work.timeZone = f.timeZone;
  const ctx = newContext(work, date, settings);
  if (work.pages.date !== date) work.pages = { date, used: 0 };
  assessStall(ctx, facts);
  work.pages.used += applyBudget(ctx, 0, work.pages.used).paged;
  return { state: work, alerts: ctx.records, outcome: 'applied' };
}

/** A planner's acknowledge / snooze / resolve between closes. */
export function applyCommand(state: MonitorState, input: unknown, settings: MonitoringSettings = DEFAULT_MONITORING_SETTINGS): IntradayResult {
  const parsed = alertCommandSchema.safeParse(input);
  if (!parsed.success) return { state, alerts: [], outcome: 'rejected', issues: issuesOf(parsed.error) };
  const cmd = parsed.data;
  const on = state.timeZone ? localDateOf(cmd.atMs, state.timeZone) : (state.lastDate ?? new Date(cmd.atMs).toISOString().slice(0, 10));
  const work = structuredClone(state);
  const ctx = newContext(work, on, settings);
  const outcome: CommandOutcome = applyCommandTo(ctx, cmd);
  if (outcome.status === 'refused') return { state, alerts: [], outcome: 'refused', ...(outcome.refused ? { refused: outcome.refused } : {}) };
  if (outcome.status === 'duplicate' && ctx.records.length === 0) return { state: work, alerts: [], outcome: 'duplicate' };
  return { state: work, alerts: ctx.records, outcome: 'applied' };
}
