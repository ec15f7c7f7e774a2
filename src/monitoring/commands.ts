import type { ErrorCode } from '../errors.ts';
import { apply, type DayContext } from './day-context.ts';
import type { MonitorCommand } from './day-input.ts';
import { localDateOf } from './dates.ts';
import { isActive, type LifecycleEvent } from './lifecycle.ts';

// A planner's acknowledge / snooze / resolve. Commands are idempotent by id; acting on a group alert acts on its
// active members too (acknowledging "14 items up at DC-NORTH" acknowledges the 14).

export interface CommandOutcome {
  readonly status: 'applied' | 'duplicate' | 'refused';
  readonly refused?: { readonly code: ErrorCode; readonly message: string };
}

export function applyCommandTo(ctx: DayContext, cmd: MonitorCommand): CommandOutcome {
  const state = ctx.state;
  if (state.commands[cmd.commandId] !== undefined) return { status: 'duplicate' };
  const entry = state.alerts[cmd.alertId];
  if (!entry) {
    return { status: 'refused', refused: { code: 'NEARCAST_ALERT_NOT_FOUND', message: `alertId: ${cmd.alertId} is not a known alert of ${state.location}` } };
  }
  // The day the person acted, in the location's own calendar (the day being closed if no time zone is known yet).
  const on = state.timeZone ? localDateOf(cmd.atMs, state.timeZone) : ctx.on;
  const event: LifecycleEvent =
    cmd.action === 'acknowledge' ? { kind: 'acknowledge', on } : cmd.action === 'resolve' ? { kind: 'resolve', on } : { kind: 'snooze', on, until: cmd.until! };
  const before = ctx.records.length;
  const result = apply(ctx, entry, event, cmd.by ?? null);
  if (result.refused) return { status: 'refused', refused: { code: result.refused.code, message: `${cmd.action} ${cmd.alertId}: ${result.refused.message}` } };
  if (entry.scope === 'location' || entry.scope === 'customer' || entry.scope === 'item') {
    for (const member of Object.values(state.alerts).filter((e) => e.groupId === entry.alertId && isActive(e.life)).sort((a, b) => (a.alertId < b.alertId ? -1 : 1))) {
      apply(ctx, member, event, cmd.by ?? null);
    }
  }
  state.commands[cmd.commandId] = on;
  return { status: ctx.records.length > before ? 'applied' : 'duplicate' };
}
