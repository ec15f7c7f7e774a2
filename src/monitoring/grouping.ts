import { deterministicId } from '../contracts/cloudevents.ts';
import { apply, openAlert, publish, type DayContext } from './day-context.ts';
import { daysBetween } from './dates.ts';
import { isActive, SEVERITIES, severityRank, type Severity } from './lifecycle.ts';
import type { AlertEntry, Direction, Measure } from './state.ts';
import { EMPTY_MEASURE } from './state.ts';

// Many series firing the same way within a few days are one story (a heat wave, a customer stocking up, a feed
// problem): they become one group alert, paged once, with every member listed. A series alert that joins a group
// keeps its own record stream (delivered in the digest) and names the group; the group lists it. A customer group is
// tried first (the more specific cause), then a location group for the rest.

export function groupLocation(ctx: DayContext): void {
  const { windowDays, minCustomerMembers, minLocationMembers } = ctx.settings.group;
  for (const dir of ['up', 'down'] as const) {
    const recent = Object.values(ctx.state.alerts)
      .filter((e) => e.scope === 'series' && e.direction === dir && isActive(e.life) && !inActiveGroup(ctx, e))
      .filter((e) => daysBetween(e.life.lastSignalOn, ctx.on) < windowDays)
      .sort((a, b) => (a.alertId < b.alertId ? -1 : 1));
    const byCustomer = new Map<string, AlertEntry[]>();
    for (const e of recent) if (e.customer !== null) byCustomer.set(e.customer, [...(byCustomer.get(e.customer) ?? []), e]);
    const grouped = new Set<string>();
    for (const [customer, members] of [...byCustomer.entries()].sort((a, b) => (a[0] < b[0] ? -1 : 1))) {
      if (join(ctx, `customer|${customer}|${dir}`, 'customer', customerGroupItem(customer), customer, dir, members, minCustomerMembers)) {
        for (const m of members) grouped.add(m.alertId);
      }
    }
    const rest = recent.filter((e) => !grouped.has(e.alertId));
    join(ctx, `location|*|${dir}`, 'location', '*', null, dir, rest, minLocationMembers);
  }
  maintainGroups(ctx);
}

/**
 * A customer group's item part of the identity: a digest of the customer id, so alert ids, keys and messages, which a
 * distribution centre may read, never carry a customer's name; the name stays in the `customer` field alone.
 */
export function customerGroupItem(customer: string): string {
  return `*customer:${deterministicId('customer', customer).slice(0, 12)}`;
}

function inActiveGroup(ctx: DayContext, e: AlertEntry): boolean {
  const g = e.groupId ? ctx.state.alerts[e.groupId] : undefined;
  return g !== undefined && isActive(g.life);
}

/** Adds members to the key's active group, or forms (or re-opens) one when there are enough. */
function join(
  ctx: DayContext,
  key: string,
  scope: 'customer' | 'location',
  item: string,
  customer: string | null,
  dir: Direction,
  members: AlertEntry[],
  minMembers: number,
): boolean {
  if (members.length === 0) return false;
  const current = ctx.state.groups[key] ? ctx.state.alerts[ctx.state.groups[key]!] : undefined;
  if (current && isActive(current.life)) {
    const before = current.members.length;
    addMembers(current, members);
    current.measure = groupMeasure(ctx, current);
    if (current.members.length > before) publish(ctx, current, 'members-changed');
    return true;
  }
  const severity = maxSeverity(members);
  if (current && current.life.closedByPerson) {
    // A person resolved this story: its new members join it quietly (only a worse one brings it back).
    addMembers(current, members);
    current.measure = groupMeasure(ctx, current);
    apply(ctx, current, { kind: 'signal', on: ctx.on, severity });
    return true;
  }
  if (members.length < minMembers) return false;
  if (current) {
    // Re-forming within a few days of resolving is the same story: the same identity comes back.
    const saved = { members: [...current.members], measure: current.measure, groupIds: members.map((m) => m.groupId) };
    addMembers(current, members);
    current.measure = groupMeasure(ctx, current);
    const r = apply(ctx, current, { kind: 'signal', on: ctx.on, severity });
    if (!r.newEpisode) return true;
    current.members = saved.members;
    current.measure = saved.measure;
    members.forEach((m, i) => (m.groupId = saved.groupIds[i]!));
  }
  const keys = [...new Set(members.flatMap((m) => m.members))].sort();
  const group = openAlert(ctx, {
    scope,
    rule: dir === 'up' ? 'demand-up' : 'demand-down',
    item,
    customer,
    direction: dir,
    episodeStart: ctx.on,
    severity,
    measure: measureOf(members),
    members: keys,
  });
  for (const m of members) m.groupId = group.alertId;
  ctx.state.groups[key] = group.alertId;
  return true;
}

function addMembers(group: AlertEntry, members: AlertEntry[]): void {
  const keys = new Set(group.members);
  for (const m of members) {
    m.groupId = group.alertId;
    for (const k of m.members) {
      if (keys.has(k)) continue;
      keys.add(k);
      group.members.push(k);
    }
  }
  group.members.sort();
}

function maxSeverity(members: AlertEntry[]): Severity {
  return SEVERITIES[Math.max(...members.map((m) => severityRank(m.life.severity)))]!;
}

function membersOf(ctx: DayContext, group: AlertEntry): AlertEntry[] {
  return Object.values(ctx.state.alerts).filter((e) => e.groupId === group.alertId);
}

function groupMeasure(ctx: DayContext, group: AlertEntry): Measure {
  return measureOf(membersOf(ctx, group));
}

function measureOf(members: AlertEntry[]): Measure {
  const ms = members.map((m) => m.measure);
  const sum = (f: (m: Measure) => number | null): number | null => {
    const vals = ms.map(f).filter((v): v is number => v !== null);
    return vals.length === 0 ? null : vals.reduce((a, b) => a + b, 0);
  };
  const observed = sum((m) => m.observed);
  const expected = sum((m) => m.expected);
  return {
    ...EMPTY_MEASURE,
    observed,
    expected,
    relative: observed !== null && expected !== null && expected > 0 ? Math.abs(observed - expected) / expected : null,
    unitsAtRisk: sum((m) => m.unitsAtRisk),
    valueAtRisk: sum((m) => m.valueAtRisk),
  };
}

/** A group lives while any member does, and re-escalates when its worst member gets worse. */
function maintainGroups(ctx: DayContext): void {
  for (const id of Object.values(ctx.state.groups).sort()) {
    const group = ctx.state.alerts[id];
    if (!group || (group.scope !== 'location' && group.scope !== 'customer')) continue;
    const members = membersOf(ctx, group);
    const live = members.filter((m) => isActive(m.life));
    if (!isActive(group.life)) {
      // A day with no active member is a quiet day for the story; it lets a person's resolution run out.
      if (group.life.closedByPerson && live.length === 0) apply(ctx, group, { kind: 'in-control', on: ctx.on });
      continue;
    }
    if (live.length === 0) {
      apply(ctx, group, { kind: 'cleared', on: ctx.on });
      continue;
    }
    const worst = maxSeverity(live);
    if (severityRank(worst) > severityRank(group.life.severity)) {
      group.measure = groupMeasure(ctx, group);
      apply(ctx, group, { kind: 'signal', on: ctx.on, severity: worst });
    } else if (live.some((m) => m.life.lastSignalOn === ctx.on)) {
      // Still firing: the group is not quiet, whatever its members' own hysteresis says.
      apply(ctx, group, { kind: 'signal', on: ctx.on, severity: group.life.severity });
    }
  }
}
