import { describe, expect, it } from 'vitest';
import type { EventLogRecord, LogEntry } from '../../../../src/runtime/event-log-record.ts';
import { DEFAULT_STAGE_SETTINGS } from '../../../../src/runtime/stage-settings.ts';
import { CLOCK_KEY_PREFIX, isClockKey, PartitionClock } from '../../../../src/transport/kafka/partition-clock.ts';

const at = (iso: string) => Date.parse(iso);
const settings = { feedStallAfterMs: DEFAULT_STAGE_SETTINGS.feedStallAfterMs, defaultDayCloseDeadline: '04:00' };

function entry(offset: number, kind: EventLogRecord['kind'], record: Record<string, unknown>, arrivalMs: number): LogEntry {
  return { offset: String(offset), record: { v: 1, kind, location: 'DC-NORTH', knowledgeMs: arrivalMs, arrivalMs, source: { kind: 'file', file: 't', line: offset }, record } as EventLogRecord };
}

const master = { location: 'DC-NORTH', timeZone: 'Europe/Berlin', items: { 'COLA-1L': { unitPrice: 1.2 } } };
const line = { eventId: 'e1', orderId: 'SO-1', lineId: '1', revision: 1, op: 'upsert', location: 'DC-NORTH', item: 'COLA-1L', quantity: 4, orderedAt: '2026-03-02T10:00:00+01:00', requestedDate: '2026-03-05' };

function started(): PartitionClock {
  const clock = new PartitionClock(settings);
  clock.accept(clock.observe([entry(0, 'location', master, at('2026-03-02T08:00:00Z')), entry(1, 'order-line', line, at('2026-03-02T09:00:00Z'))]));
  return clock;
}

describe('the partition clock', () => {
  it('learns a location from its master record and starts its cursor at its first order line, only once accepted', () => {
    const clock = new PartitionClock(settings);
    const changes = clock.observe([entry(0, 'location', master, at('2026-03-02T08:00:00Z')), entry(1, 'order-line', line, at('2026-03-02T09:00:00Z'))]);
    expect(clock.locations()).toEqual([]);
    clock.accept(changes);
    // The item list is never needed by the clock, so it is not kept (it can hold 100k items).
    expect(clock.get('DC-NORTH')).toEqual({ master: { location: 'DC-NORTH', timeZone: 'Europe/Berlin' }, cursor: { nextDeadlineDate: '2026-03-02', nextCheckMs: null } });
  });

  it('writes no deadline close before the deadline, then exactly one, and none again for the same time', () => {
    const clock = started();
    // 04:00 on 2026-03-03 in Berlin (CET, UTC+1) is 03:00Z.
    expect(clock.due(at('2026-03-03T02:59:59Z')).records).toEqual([]);
    const { records, changes } = clock.due(at('2026-03-03T03:00:00Z'));
    expect(records.map((r) => r.record)).toEqual([{ location: 'DC-NORTH', date: '2026-03-02', deadlineMs: at('2026-03-03T03:00:00Z') }]);
    clock.accept(changes);
    expect(clock.due(at('2026-03-03T03:00:00Z')).records).toEqual([]);
  });

  it('leaves its own state unchanged until the records are accepted (a failed transaction writes them again)', () => {
    const clock = started();
    expect(clock.due(at('2026-03-03T03:30:00Z')).records).toHaveLength(1);
    expect(clock.due(at('2026-03-03T03:30:00Z')).records).toHaveLength(1);
  });

  it('restores its cursors from the changelog entries it wrote, ignoring every other key', () => {
    const clock = started();
    const { changes } = clock.due(at('2026-03-03T03:30:00Z'));
    const entries = [{ key: 'DC-NORTH', value: '{"not":"clock"}' }, { key: '#partition', value: '{}' }, ...clock.changelog(changes)];
    expect(entries.filter((e) => isClockKey(e.key)).map((e) => e.key)).toEqual([`${CLOCK_KEY_PREFIX}DC-NORTH`]);
    const restored = new PartitionClock(settings);
    restored.restore(entries);
    expect(restored.locations()).toEqual(['DC-NORTH']);
    expect(restored.get('DC-NORTH')?.cursor?.nextDeadlineDate).toBe('2026-03-03');
    expect(restored.due(at('2026-03-03T03:30:00Z')).records).toEqual([]);
  });
});
