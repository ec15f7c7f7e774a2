import type { AlertState } from '../contracts/alert.ts';
import type { ErrorCode } from '../errors.ts';
import { addDays, daysBetween } from './dates.ts';
import type { MonitoringSettings } from './settings.ts';

// The alert lifecycle as a pure state machine: open → acknowledged → resolved, with a bounded snooze, automatic
// resolution after a run of in-control days, re-opening of a recently resolved alert and re-escalation when the
// deviation worsens. Every transition that changes what a planner sees is named (a `Change`); everything else is
// bookkeeping that yields no record.

export const SEVERITIES = ['low', 'medium', 'high'] as const;
export type Severity = (typeof SEVERITIES)[number];
export const severityRank = (s: Severity): number => SEVERITIES.indexOf(s);

export type Change =
  | 'opened'
  | 'reopened'
  | 'escalated'
  | 'acknowledged'
  | 'snoozed'
  | 'snooze-ended'
  | 'resolved'
  | 'auto-resolved'
  | 'members-changed';

export interface Lifecycle {
  readonly state: AlertState;
  readonly severity: Severity;
  readonly snoozedUntil: string | null;
  /** Last date the rule fired for this alert. */
  readonly lastSignalOn: string;
  /** Consecutive in-control days since the last signal. */
  readonly inControlDays: number;
  /** Resolved by a person: the run of signals that was going on does not re-open it. */
  readonly closedByPerson: boolean;
  readonly resolvedOn: string | null;
}

export type LifecycleEvent =
  /** The rule fired (again) on this date with this severity. */
  | { readonly kind: 'signal'; readonly on: string; readonly severity: Severity }
  /** The rule was evaluated and the series was in control (hysteresis already applied by the caller). */
  | { readonly kind: 'in-control'; readonly on: string }
  /** The condition behind the alert is gone for certain (records flow again; a group has no active member). */
  | { readonly kind: 'cleared'; readonly on: string }
  /** A new business day began: snoozes may end. */
  | { readonly kind: 'day'; readonly on: string }
  | { readonly kind: 'acknowledge'; readonly on: string }
  | { readonly kind: 'snooze'; readonly on: string; readonly until: string }
  | { readonly kind: 'resolve'; readonly on: string };

export interface Step {
  readonly next: Lifecycle;
  readonly change: Change | null;
  /** A signal on an alert too long resolved: the caller starts a new episode with a new identity. */
  readonly newEpisode?: true;
  readonly refused?: { readonly code: ErrorCode; readonly message: string };
}

export type LifecycleSettings = MonitoringSettings['lifecycle'];

export function openLifecycle(on: string, severity: Severity): Lifecycle {
  return { state: 'open', severity, snoozedUntil: null, lastSignalOn: on, inControlDays: 0, closedByPerson: false, resolvedOn: null };
}

export function isActive(l: Lifecycle): boolean {
  return l.state !== 'resolved';
}

const same = (l: Lifecycle): Step => ({ next: l, change: null });

export function step(l: Lifecycle, e: LifecycleEvent, s: LifecycleSettings): Step {
  switch (e.kind) {
    case 'signal':
      return onSignal(l, e.on, e.severity, s);
    case 'in-control':
      return onInControl(l, e.on, s);
    case 'cleared':
      return isActive(l) ? { next: resolved(l, e.on, false), change: 'auto-resolved' } : same(l);
    case 'day':
      if (l.state === 'snoozed' && l.snoozedUntil !== null && e.on > l.snoozedUntil) {
        return { next: { ...l, state: 'open', snoozedUntil: null }, change: 'snooze-ended' };
      }
      return same(l);
    case 'acknowledge':
      if (l.state === 'resolved') return refuse(l, 'NEARCAST_ALERT_TRANSITION_INVALID', 'a resolved alert cannot be acknowledged');
      if (l.state === 'acknowledged') return same(l);
      return { next: { ...l, state: 'acknowledged', snoozedUntil: null }, change: 'acknowledged' };
    case 'snooze': {
      if (l.state === 'resolved') return refuse(l, 'NEARCAST_ALERT_TRANSITION_INVALID', 'a resolved alert cannot be snoozed');
      if (e.until < e.on) return refuse(l, 'NEARCAST_ALERT_SNOOZE_INVALID', `until (${e.until}) must not be before the day it is asked (${e.on})`);
      if (daysBetween(e.on, e.until) > s.maxSnoozeDays) {
        return refuse(l, 'NEARCAST_ALERT_SNOOZE_INVALID', `until must be at most ${s.maxSnoozeDays} days ahead (latest ${addDays(e.on, s.maxSnoozeDays)})`);
      }
      if (l.state === 'snoozed' && l.snoozedUntil === e.until) return same(l);
      return { next: { ...l, state: 'snoozed', snoozedUntil: e.until }, change: 'snoozed' };
    }
    case 'resolve':
      if (l.state === 'resolved') return same(l);
      return { next: resolved(l, e.on, true), change: 'resolved' };
  }
}

function onSignal(l: Lifecycle, on: string, severity: Severity, s: LifecycleSettings): Step {
  if (isActive(l)) {
    const worse = severityRank(severity) > severityRank(l.severity);
    const next: Lifecycle = { ...l, lastSignalOn: on, inControlDays: 0 };
    if (!worse) return { next, change: null };
    return { next: { ...next, state: 'open', severity, snoozedUntil: null }, change: 'escalated' };
  }
  if (l.closedByPerson) {
    // A person closed it while the run was going on; only a worse deviation brings it back.
    if (severityRank(severity) > severityRank(l.severity)) {
      return { next: reopened(l, on, severity), change: 'escalated' };
    }
    return { next: { ...l, lastSignalOn: on, inControlDays: 0 }, change: null };
  }
  if (l.resolvedOn !== null && daysBetween(l.resolvedOn, on) <= s.reopenWithinDays) {
    return { next: reopened(l, on, severity), change: 'reopened' };
  }
  return { next: l, change: null, newEpisode: true };
}

function onInControl(l: Lifecycle, on: string, s: LifecycleSettings): Step {
  if (on <= l.lastSignalOn) return same(l);
  const days = l.inControlDays + 1;
  if (isActive(l)) {
    if (days >= s.resolveAfterDays) return { next: resolved({ ...l, inControlDays: days }, on, false), change: 'auto-resolved' };
    return { next: { ...l, inControlDays: days }, change: null };
  }
  if (l.closedByPerson && days >= s.resolveAfterDays) {
    // The run the person closed has ended quietly: from now on it behaves like an auto-resolved alert.
    return { next: { ...l, inControlDays: days, closedByPerson: false, resolvedOn: on }, change: null };
  }
  return { next: { ...l, inControlDays: days }, change: null };
}

function resolved(l: Lifecycle, on: string, byPerson: boolean): Lifecycle {
  return { ...l, state: 'resolved', snoozedUntil: null, resolvedOn: on, closedByPerson: byPerson, inControlDays: byPerson ? 0 : l.inControlDays };
}

function reopened(l: Lifecycle, on: string, severity: Severity): Lifecycle {
  return { ...l, state: 'open', severity, snoozedUntil: null, lastSignalOn: on, inControlDays: 0, closedByPerson: false, resolvedOn: null };
}

function refuse(l: Lifecycle, code: ErrorCode, message: string): Step {
  return { next: l, change: null, refused: { code, message } };
}
