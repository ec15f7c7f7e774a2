import type { Location } from '../../contracts/location.ts';
import { clockRecordsDue, startCursor, type ClockCursor, type ClockRecord } from '../../runtime/clock-records.ts';
import type { LogEntry } from '../../runtime/event-log-record.ts';
import type { StageSettings } from '../../runtime/stage-settings.ts';
import type { ChangelogEntry } from '../../runtime/stage-output.ts';

// The live clock of one event-log partition: which locations it knows (from the location records it fed to its
// stage) and, per location, how far the deadline and feed-health clock has written (clock-records.ts cursors).
// The state lives in the partition's changelog under keys of its own (`#clock:<location>`), written in the same
// transaction as the batch that changed it or the clock records that advanced it — so after a crash or a move the
// new owner resumes exactly where the committed log ends, and a deadline is never written twice. Nothing here does
// I/O or reads a clock: the owner passes `nowMs` in.

export const CLOCK_KEY_PREFIX = '#clock:';

export function isClockKey(key: string): boolean {
  return key.startsWith(CLOCK_KEY_PREFIX);
}

/** What the clock needs of a location's master data (the item list can be large and is never needed here). */
export type ClockMaster = Omit<Location, 'items'>;

export interface LocationClock {
  readonly master: ClockMaster;
  /** null until the location's first order line or shipment (as the embedded live clock and backtests do). */
  readonly cursor: ClockCursor | null;
}

/** Changes not yet committed: apply with `accept` once their transaction committed. */
export type ClockChanges = ReadonlyMap<string, LocationClock>;

export type ClockSettings = Pick<StageSettings, 'feedStallAfterMs' | 'defaultDayCloseDeadline'>;

function clockMaster(location: Location): ClockMaster {
  const { items: _items, ...rest } = location;
  return rest;
}

export class PartitionClock {
  private clocks = new Map<string, LocationClock>();

  constructor(private readonly settings: ClockSettings) {}

  /** Rebuilds from the partition's changelog entries (only `#clock:` keys are read; last value per key wins). */
  restore(entries: Iterable<ChangelogEntry>): void {
    this.clocks = new Map();
    for (const { key, value } of entries) {
      if (!isClockKey(key)) continue;
      const location = key.slice(CLOCK_KEY_PREFIX.length);
      if (value === null) this.clocks.delete(location);
      else this.clocks.set(location, JSON.parse(value) as LocationClock);
    }
  }

  locations(): readonly string[] {
    return [...this.clocks.keys()].sort();
  }

  get(location: string): LocationClock | undefined {
    return this.clocks.get(location);
  }

  /** What a batch changes: a location record sets the master, a first fact starts the location's cursor. */
  observe(entries: readonly LogEntry[]): ClockChanges {
    const changes = new Map<string, LocationClock>();
    for (const { record } of entries) {
      const current = changes.get(record.location) ?? this.clocks.get(record.location);
      if (record.kind === 'location') {
        changes.set(record.location, { master: clockMaster(record.record), cursor: current?.cursor ?? null });
      } else if ((record.kind === 'order-line' || record.kind === 'shipment') && current && current.cursor === null) {
        changes.set(record.location, { master: current.master, cursor: startCursor(current.master as Location, record.arrivalMs, this.settings) });
      }
    }
    return changes;
  }

  /** The clock records due at `nowMs` for every started location, with the cursor changes that go with them. */
  due(nowMs: number): { records: ClockRecord[]; changes: ClockChanges } {
    const masters = new Map<string, Location>();
    const cursors = new Map<string, ClockCursor>();
    for (const [location, clock] of this.clocks) {
      if (clock.cursor === null) continue;
      masters.set(location, clock.master as Location);
      cursors.set(location, { ...clock.cursor });
    }
    const records = clockRecordsDue(nowMs, masters, cursors, this.settings);
    const changes = new Map<string, LocationClock>();
    for (const [location, cursor] of cursors) {
      const before = this.clocks.get(location)!;
      if (before.cursor!.nextDeadlineDate !== cursor.nextDeadlineDate || before.cursor!.nextCheckMs !== cursor.nextCheckMs) {
        changes.set(location, { master: before.master, cursor });
      }
    }
    return { records, changes };
  }

  /** The changelog entries that persist `changes` (in location order). */
  changelog(changes: ClockChanges): ChangelogEntry[] {
    return [...changes.keys()].sort().map((location) => ({ key: `${CLOCK_KEY_PREFIX}${location}`, value: JSON.stringify(changes.get(location)) }));
  }

  accept(changes: ClockChanges): void {
    for (const [location, clock] of changes) this.clocks.set(location, clock);
  }
}
