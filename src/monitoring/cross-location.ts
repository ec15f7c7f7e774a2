import type { Alert } from '../contracts/alert.ts';
import { applyBudget } from './budget.ts';
import { apply, newContext, openAlert, publish } from './day-context.ts';
import { daysBetween } from './dates.ts';
import { isActive, SEVERITIES, severityRank, type Severity } from './lifecycle.ts';
import { DEFAULT_MONITORING_SETTINGS, type MonitoringSettings } from './settings.ts';
import { EMPTY_MEASURE, initialMonitorState, type Direction, type MonitorState } from './state.ts';

// One item firing the same way at several locations within a few days (a national promotion, a recall, a listing
// change) becomes one item alert. Each location's monitoring runs on its own partition and cannot see the others,
// so this stage reads the committed alert records of all locations for a date and keeps its own small state. Its
// alerts have location `*` and follow the same lifecycle.

const UP = new Set(['spike', 'shift-up']);
const DOWN = new Set(['drop', 'shift-down']);

interface SeriesSignal {
  location: string;
  item: string;
  direction: Direction;
  lastSignalOn: string;
  severity: Severity;
  active: boolean;
}

export interface CrossLocationState {
  monitor: MonitorState;
  /** Latest series alert state per location|item|direction. */
  series: Record<string, SeriesSignal>;
}

export function initialCrossLocationState(): CrossLocationState {
  return { monitor: initialMonitorState('*'), series: {} };
}

/** Feeds one date's alert records of every location; returns the item-group alert records of that date. */
export function groupAcrossLocations(
  state: CrossLocationState,
  date: string,
  records: readonly Alert[],
  settings: MonitoringSettings = DEFAULT_MONITORING_SETTINGS,
): { state: CrossLocationState; alerts: Alert[] } {
  if (state.monitor.lastDate !== null && date <= state.monitor.lastDate) return { state, alerts: [] };
  const work = structuredClone(state);
  const ctx = newContext(work.monitor, date, settings);
  if (work.monitor.pages.date !== date) work.monitor.pages = { date, used: 0 };

  for (const r of records) {
    if (r.scope !== 'series' || r.location === '*') continue;
    const direction: Direction | null = UP.has(r.rule) ? 'up' : DOWN.has(r.rule) ? 'down' : null;
    if (direction === null) continue;
    work.series[`${r.location}|${r.item}|${direction}`] = {
      location: r.location,
      item: r.item,
      direction,
      lastSignalOn: r.lastSignalOn,
      severity: r.severity,
      active: r.state !== 'resolved',
    };
  }

  const byItem = new Map<string, SeriesSignal[]>();
  for (const sig of Object.values(work.series)) {
    if (!sig.active) continue;
    const key = `item|${sig.item}|${sig.direction}`;
    byItem.set(key, [...(byItem.get(key) ?? []), sig]);
  }
  const { windowDays, minItemLocations } = settings.group;
  for (const key of [...new Set([...byItem.keys(), ...Object.keys(work.monitor.groups)])].sort()) {
    const live = byItem.get(key) ?? [];
    const recent = live.filter((s) => daysBetween(s.lastSignalOn, date) < windowDays);
    const members = [...new Set(live.map((s) => `${s.location}|${s.item}`))].sort();
    const id = work.monitor.groups[key];
    const current = id ? work.monitor.alerts[id] : undefined;
    const severity = SEVERITIES[Math.max(0, ...live.map((s) => severityRank(s.severity)))]!;
    if (current && isActive(current.life)) {
      if (live.length === 0) {
        apply(ctx, current, { kind: 'cleared', on: date });
        continue;
      }
      const added = members.filter((m) => !current.members.includes(m));
      if (added.length > 0) {
        current.members = [...current.members, ...added].sort();
        publish(ctx, current, 'members-changed');
      }
      if (recent.length > 0) apply(ctx, current, { kind: 'signal', on: date, severity });
      continue;
    }
    if (new Set(recent.map((s) => s.location)).size < minItemLocations) continue;
    const [, item, dir] = key.split('|') as [string, string, Direction];
    if (current) {
      current.members = [...new Set([...current.members, ...members])].sort();
      if (!apply(ctx, current, { kind: 'signal', on: date, severity }).newEpisode) continue;
    }
    const entry = openAlert(ctx, {
      scope: 'item',
      rule: dir === 'up' ? 'demand-up' : 'demand-down',
      item,
      customer: null,
      direction: dir,
      episodeStart: date,
      severity,
      measure: EMPTY_MEASURE,
      members,
    });
    work.monitor.groups[key] = entry.alertId;
  }
  work.monitor.pages.used += applyBudget(ctx, 0, work.monitor.pages.used).paged;
  work.monitor.lastDate = date;
  // Resolved series are forgotten once no group can need them.
  for (const [k, s] of Object.entries(work.series)) if (!s.active && daysBetween(s.lastSignalOn, date) > windowDays) delete work.series[k];
  return { state: work, alerts: ctx.records };
}
