import { clockRecordsDue, startCursor, type ClockCursor } from '../../runtime/clock-records.ts';
import type { EventLogRecord } from '../../runtime/event-log-record.ts';
import type { EmbeddedRuntime } from './embedded-runtime.ts';

const CURSOR_PREFIX = 'clock:';

/**
 * The wall clock of a live embedded service, turned into event-log records: deadline closes and feed-health checks
 * are appended (with the clock's cursors, in one transaction) so the sensing stage never reads a clock itself and a
 * replay of the file closes the same days. `now` is injected; only the serve command passes Date.now.
 */
export class LiveClock {
  private readonly cursors = new Map<string, ClockCursor>();

  constructor(
    private readonly runtime: EmbeddedRuntime,
    private readonly now: () => number,
  ) {
    const rows = runtime.store.db.prepare("SELECT name, value FROM positions WHERE name LIKE 'clock:%' ORDER BY name").all() as { name: string; value: string }[];
    for (const r of rows) this.cursors.set(r.name.slice(CURSOR_PREFIX.length), JSON.parse(r.value) as ClockCursor);
  }

  /** Starts the clock for locations whose first order line or shipment is among `records`. */
  noteFacts(records: readonly EventLogRecord[]): void {
    const masters = this.runtime.masters();
    const started: [string, ClockCursor][] = [];
    for (const r of records) {
      if ((r.kind !== 'order-line' && r.kind !== 'shipment') || this.cursors.has(r.location)) continue;
      const master = masters.get(r.location);
      if (!master) continue;
      const cursor = startCursor(master, r.arrivalMs, this.runtime.settings);
      this.cursors.set(r.location, cursor);
      started.push([r.location, cursor]);
    }
    if (started.length === 0) return;
    this.runtime.store.transaction(() => {
      for (const [location, cursor] of started) this.runtime.store.setPosition(`${CURSOR_PREFIX}${location}`, JSON.stringify(cursor));
    });
  }

  /** Appends what became due and applies it; returns the number of clock records written. */
  tick(): number {
    const due = clockRecordsDue(this.now(), this.runtime.masters(), this.cursors, this.runtime.settings);
    if (due.length === 0) return 0;
    const touched = new Set(due.map((d) => d.location));
    this.runtime.store.transaction(() => {
      this.runtime.append(due);
      for (const location of touched) this.runtime.store.setPosition(`${CURSOR_PREFIX}${location}`, JSON.stringify(this.cursors.get(location)));
    });
    this.runtime.pump();
    return due.length;
  }
}
