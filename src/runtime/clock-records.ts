import type { Location } from '../contracts/location.ts';
import type { EventLogRecordOf } from './event-log-record.ts';
import { addDays, deadlineMs, isBusinessDay, localDateOf, localTimeMs } from './local-day.ts';
import type { StageSettings } from './stage-settings.ts';

// Deadline closes and feed-health checks are facts about time passing. The shell turns the passing of time into
// event-log records — from the wall clock when live, from the replay clock (the merged stream's arrival time) in a
// replay or backtest — so the sensing stage itself never reads a clock and a replay of the log closes the same days.

export type ClockRecord = EventLogRecordOf<'deadline-close'> | EventLogRecordOf<'feed-health-check'>;

/** Per location: what the clock has already written. JSON-serialisable (the embedded store persists it). */
export interface ClockCursor {
  /** Next local date whose deadline has not been written yet. */
  nextDeadlineDate: string;
  /** Next feed-health check instant not yet written (epoch ms), or null before the first one is scheduled. */
  nextCheckMs: number | null;
}

const HOUR_MS = 3_600_000;

/** A cursor starting at `fromMs`: deadlines from that local date on, checks after that instant. */
export function startCursor(location: Location, fromMs: number, settings: Pick<StageSettings, 'feedStallAfterMs'>): ClockCursor {
  return { nextDeadlineDate: localDateOf(fromMs, location.timeZone), nextCheckMs: nextCheckAfter(location, fromMs, settings) };
}

/** First check instant after `afterMs`: full local hours from open + stall time to close, on business days. */
export function nextCheckAfter(location: Location, afterMs: number, settings: Pick<StageSettings, 'feedStallAfterMs'>): number | null {
  const hours = location.businessHours;
  if (!hours) return null; // without business hours there is no period in which silence means a stalled feed
  let date = localDateOf(afterMs, location.timeZone);
  for (let i = 0; i < 15; i++, date = addDays(date, 1)) {
    if (!isBusinessDay(location, date)) continue;
    const open = localTimeMs(date, hours.open, location.timeZone);
    const close = localTimeMs(date, hours.close, location.timeZone);
    let t = Math.ceil((open + settings.feedStallAfterMs) / HOUR_MS) * HOUR_MS;
    while (t <= close) {
      if (t > afterMs) return t;
      t += HOUR_MS;
    }
  }
  return null;
}

// A cursor's next deadline instant, remembered while its date stays the same: a replay asks every cursor at every
// record (20M records over 10 locations in a 100k-series backfill), and each answer is a time-zone conversion.
const deadlineOf = new WeakMap<ClockCursor, { readonly date: string; readonly deadline: string; readonly timeZone: string; readonly ms: number }>();

function nextDeadlineMs(cursor: ClockCursor, deadline: string, timeZone: string): number {
  const known = deadlineOf.get(cursor);
  if (known && known.date === cursor.nextDeadlineDate && known.deadline === deadline && known.timeZone === timeZone) return known.ms;
  const ms = deadlineMs(cursor.nextDeadlineDate, deadline, timeZone);
  deadlineOf.set(cursor, { date: cursor.nextDeadlineDate, deadline, timeZone, ms });
  return ms;
}

/**
 * Records due at `nowMs` for every location with a cursor, in time order (then location), advancing the cursors.
 * Deadline closes are written for every date; the stage ignores dates already closed and days that are not
 * business days.
 */
export function clockRecordsDue(
  nowMs: number,
  locations: ReadonlyMap<string, Location>,
  cursors: Map<string, ClockCursor>,
  settings: Pick<StageSettings, 'feedStallAfterMs' | 'defaultDayCloseDeadline'>,
): ClockRecord[] {
  const due: ClockRecord[] = [];
  for (const [id, cursor] of cursors) {
    const location = locations.get(id);
    if (!location) continue;
    const deadline = location.dayCloseDeadline ?? settings.defaultDayCloseDeadline;
    for (let d = nextDeadlineMs(cursor, deadline, location.timeZone); d <= nowMs; ) {
      due.push({
        v: 1,
        kind: 'deadline-close',
        location: id,
        knowledgeMs: d,
        arrivalMs: d,
        source: { kind: 'internal', origin: 'deadline-clock' },
        record: { location: location.location, date: cursor.nextDeadlineDate, deadlineMs: d },
      });
      cursor.nextDeadlineDate = addDays(cursor.nextDeadlineDate, 1);
      d = nextDeadlineMs(cursor, deadline, location.timeZone);
    }
    if (cursor.nextCheckMs === null) cursor.nextCheckMs = nextCheckAfter(location, nowMs, settings);
    while (cursor.nextCheckMs !== null && cursor.nextCheckMs <= nowMs) {
      const at = cursor.nextCheckMs;
      due.push({
        v: 1,
        kind: 'feed-health-check',
        location: id,
        knowledgeMs: at,
        arrivalMs: at,
        source: { kind: 'internal', origin: 'feed-health-clock' },
        record: { location: location.location, atMs: at },
      });
      cursor.nextCheckMs = nextCheckAfter(location, at, settings);
    }
  }
  return due.sort((a, b) => a.arrivalMs - b.arrivalMs || (a.location < b.location ? -1 : a.location > b.location ? 1 : 0) || (a.kind < b.kind ? -1 : 1));
}
