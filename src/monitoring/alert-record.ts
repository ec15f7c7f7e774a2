import { ALERT_SCHEMA_VERSION, MAX_ALERT_MEMBERS, type Alert, type AlertChange } from '../contracts/alert.ts';
import type { Lifecycle } from './lifecycle.ts';
import type { AlertEntry } from './state.ts';
import { describeAlert } from './alert-text.ts';

// One published record per state change: the entry as it stands after the change, with the next seq.

export function alertIdOf(location: string, item: string, rule: string, episodeStart: string): string {
  return `${location}|${item}|${rule}|${episodeStart}`;
}

/** Applies a change to the entry (in place: the entry belongs to this day's working state) and returns its record. */
export function recordChange(entry: AlertEntry, next: Lifecycle, change: AlertChange, on: string, by: string | null): Alert {
  entry.life = next;
  entry.seq += 1;
  entry.lastChange = change;
  entry.changedBy = by;
  return toRecord(entry, on);
}

export function toRecord(entry: AlertEntry, on: string): Alert {
  const m = entry.measure;
  const text = describeAlert(entry);
  const members = entry.members.slice(0, MAX_ALERT_MEMBERS).map((key) => {
    const cut = key.indexOf('|');
    return { location: key.slice(0, cut), item: key.slice(cut + 1) } as Alert['members'][number];
  });
  return {
    schemaVersion: ALERT_SCHEMA_VERSION,
    alertId: entry.alertId,
    location: entry.location as Alert['location'],
    item: entry.item,
    customer: entry.customer,
    rule: entry.rule,
    firedRules: [...entry.firedRules],
    scope: entry.scope,
    episodeStart: entry.episodeStart,
    state: entry.life.state,
    change: entry.lastChange,
    seq: entry.seq,
    changedOn: on,
    changedBy: entry.changedBy,
    lastSignalOn: entry.life.lastSignalOn,
    severity: entry.life.severity,
    delivery: entry.delivery,
    groupId: entry.groupId,
    observed: m.observed,
    expected: m.expected,
    lower: m.lower,
    upper: m.upper,
    pValue: m.pValue,
    qValue: m.qValue,
    levelRatio: m.levelRatio,
    statistic: m.statistic,
    unitsAtRisk: m.unitsAtRisk,
    valueAtRisk: m.valueAtRisk,
    members,
    memberCount: entry.members.length,
    snoozedUntil: entry.life.snoozedUntil,
    message: text.message,
    whatToCheck: text.whatToCheck,
  };
}
