import { apply, openAlert, type DayContext } from './day-context.ts';
import type { ParsedDayInput } from './day-input.ts';
import { silentBusinessMinutes, stallThresholdMinutes, type BusinessHours } from './feed-health.ts';
import { isActive } from './lifecycle.ts';
import type { MonitoringSettings } from './settings.ts';
import { EMPTY_MEASURE, type AlertEntry, type MonitorState } from './state.ts';

// Feed-health alerts of a location: one for a feed gone silent in business hours, one for a day the source did not
// close by its deadline. A stalled feed usually also misses its close; that is the same trouble and one alert.

export interface FeedFacts {
  readonly date: string;
  readonly atMs: number;
  readonly lastRecordMs: number | null;
  readonly timeZone: string;
  readonly businessHours?: BusinessHours;
  readonly recordsPerHour?: number;
  readonly stalledDuringDay?: boolean;
}

function entryOf(ctx: DayContext, id: string | null): AlertEntry | undefined {
  return id ? ctx.state.alerts[id] : undefined;
}

interface StallView {
  readonly silent: number;
  readonly stalled: boolean;
  readonly current: AlertEntry | undefined;
  readonly open: boolean;
  readonly resumed: boolean;
}

function view(state: MonitorState, f: FeedFacts, s: MonitoringSettings): StallView {
  const silent = silentBusinessMinutes(f.date, f.lastRecordMs, f.atMs, f.timeZone, f.businessHours);
  const threshold = stallThresholdMinutes(f.recordsPerHour, s.feed);
  const current = state.feed.stalled ? state.alerts[state.feed.stalled] : undefined;
  const open = current !== undefined && isActive(current.life);
  // Records after the one seen when the stall was found, and no new silence, mean the feed is back.
  const after = f.lastRecordMs !== null && (current?.lastRecordMs === null || current?.lastRecordMs === undefined || f.lastRecordMs > current.lastRecordMs);
  return { silent, stalled: f.stalledDuringDay === true || silent >= threshold, current, open, resumed: after && silent < threshold };
}

/** Whether a check would publish anything (a check that changes nothing need not copy the state). */
export function stallWouldChange(state: MonitorState, f: FeedFacts, s: MonitoringSettings): boolean {
  const v = view(state, f, s);
  return v.open ? v.resumed : v.stalled;
}

/** Opens, keeps or clears the feed-stalled alert from the facts of one check (during the day or at its close). */
export function assessStall(ctx: DayContext, f: FeedFacts): void {
  const { silent, stalled, current, open, resumed } = view(ctx.state, f, ctx.settings);
  if (open) {
    if (resumed) apply(ctx, current!, { kind: 'cleared', on: ctx.on });
    else if (stalled) apply(ctx, current!, { kind: 'signal', on: ctx.on, severity: 'high' });
    return;
  }
  if (!stalled) return;
  if (current && !current.life.closedByPerson) {
    const r = apply(ctx, current, { kind: 'signal', on: ctx.on, severity: 'high' });
    if (!r.newEpisode) {
      current.lastRecordMs = f.lastRecordMs;
      return;
    }
  }
  const entry = openAlert(ctx, {
    scope: 'location',
    rule: 'feed-stalled',
    item: '*',
    customer: null,
    direction: null,
    episodeStart: f.date,
    severity: 'high',
    measure: { ...EMPTY_MEASURE, observed: silent },
    members: [],
  });
  entry.lastRecordMs = f.lastRecordMs;
  ctx.state.feed.stalled = entry.alertId;
}

/** The day's close: a deadline close (where the location names its own deadline) opens day-not-closed. */
export function assessClose(ctx: DayContext, feed: ParsedDayInput['feed'], date: string): void {
  const missed = feed.closedBy === 'deadline' && feed.ownDeadline;
  const current = entryOf(ctx, ctx.state.feed.notClosed);
  if (current && isActive(current.life)) {
    if (missed) apply(ctx, current, { kind: 'signal', on: ctx.on, severity: 'medium' });
    else apply(ctx, current, { kind: 'cleared', on: ctx.on });
    return;
  }
  if (!missed) return;
  const stall = entryOf(ctx, ctx.state.feed.stalled);
  if (stall && isActive(stall.life)) return;
  if (current) {
    const r = apply(ctx, current, { kind: 'signal', on: ctx.on, severity: 'medium' });
    if (!r.newEpisode) return;
  }
  const entry = openAlert(ctx, {
    scope: 'location',
    rule: 'day-not-closed',
    item: '*',
    customer: null,
    direction: null,
    episodeStart: date,
    severity: 'medium',
    measure: EMPTY_MEASURE,
    members: [],
  });
  ctx.state.feed.notClosed = entry.alertId;
}

/** Drops are held back on a day the feed was in trouble at any moment: its intake may be incomplete. */
export function feedTroubleOn(ctx: DayContext, date: string, stalledDuringDay: boolean): boolean {
  if (stalledDuringDay) return true;
  return [ctx.state.feed.stalled, ctx.state.feed.notClosed].some((id) => {
    const e = entryOf(ctx, id);
    return e !== undefined && (isActive(e.life) || e.life.resolvedOn === date || e.life.lastSignalOn === date);
  });
}
