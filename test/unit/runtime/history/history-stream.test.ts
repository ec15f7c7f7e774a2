import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { RecordValidator } from '../../../../src/contracts/validate.ts';
import type { EventLogRecord } from '../../../../src/runtime/event-log-record.ts';
import { historyStream, type Rejection } from '../../../../src/runtime/history/history-stream.ts';
import { DEFAULT_STAGE_SETTINGS } from '../../../../src/runtime/stage-settings.ts';
import { writeSmallHistory } from '../fixtures/history-dir.ts';

async function read(dir: string, until?: number) {
  const rejected: Rejection[] = [];
  const records: EventLogRecord[] = [];
  for await (const r of historyStream(dir, { validator: new RecordValidator(), settings: DEFAULT_STAGE_SETTINGS, onRejected: (x) => rejected.push(x), ...(until ? { clockUntilMs: until } : {}) })) records.push(r);
  return { records, rejected };
}

describe('a history folder as one event-log stream', () => {
  it('reads CRLF files with blank lines, quarantines bad lines with file, line and reason, and goes on', async () => {
    const bad = ['{"eventId": "x", oops', JSON.stringify({ eventId: 'q1', orderId: 'o', lineId: '1', revision: 1, op: 'upsert', location: 'DC-NORTH', item: 'COLA-1L', quantity: -3, orderedAt: '2026-03-03T10:00:00+01:00', requestedDate: '2026-03-04' })];
    const h = writeSmallHistory({ crlf: true, days: 7, badOrderLines: bad });
    const { records, rejected } = await read(h.dir);
    // 5 business days × 2 times × 2 items = 20 good order lines; the file has them on lines 1..20, a blank line 21,
    // and the two bad lines on 22 and 23.
    expect(records.filter((r) => r.kind === 'order-line')).toHaveLength(20);
    expect(rejected.map((r) => [r.file, r.line, r.code])).toEqual([
      ['orders.ndjson', 22, 'NEARCAST_INPUT_MALFORMED_JSON'],
      ['orders.ndjson', 23, 'NEARCAST_INPUT_INVALID'],
    ]);
    expect(rejected[1]!.reason).toContain('quantity: must not be negative');
  });

  it('logs master data first, then facts in arrival order', async () => {
    const { records } = await read(writeSmallHistory({ days: 7 }).dir);
    expect(records[0]!.kind).toBe('location');
    const arrivals = records.slice(1).map((r) => r.arrivalMs);
    expect(arrivals).toEqual([...arrivals].sort((a, b) => a - b));
  });

  it('treats orders listed after later-known ones as arriving late, at the latest knowledge time before them', async () => {
    const { records } = await read(writeSmallHistory({ days: 7, stallOn: '2026-03-03' }).dir);
    const stalled = records.filter((r) => r.kind === 'order-line' && r.record.orderedAt === '2026-03-03T14:00:00+01:00');
    expect(stalled).toHaveLength(2);
    // They stand after Wednesday's 09:00 orders, so they arrive at 2026-03-04T09:00+01:00 = 08:00Z.
    for (const r of stalled) {
      expect(r.knowledgeMs).toBe(Date.parse('2026-03-03T13:00:00Z'));
      expect(r.arrivalMs).toBe(Date.parse('2026-03-04T08:00:00Z'));
    }
  });

  it('writes deadline closes in between when the replay clock passes them, and runs on to the end of the history', async () => {
    const { records } = await read(writeSmallHistory({ days: 7 }).dir, Date.parse('2026-03-09T12:00:00Z'));
    const deadlines = records.filter((r) => r.kind === 'deadline-close').map((r) => (r.kind === 'deadline-close' ? r.record.date : ''));
    // First order Monday 03-02; the default deadline is 04:00 the next day: 03-02 … 03-08 have passed by 03-09 12:00Z.
    expect(deadlines).toEqual(['2026-03-02', '2026-03-03', '2026-03-04', '2026-03-05', '2026-03-06', '2026-03-07', '2026-03-08']);
    const firstDeadline = records.findIndex((r) => r.kind === 'deadline-close');
    expect(records[firstDeadline]!.arrivalMs).toBe(Date.parse('2026-03-03T03:00:00Z'));
    expect(records[firstDeadline - 1]!.arrivalMs).toBeLessThanOrEqual(records[firstDeadline]!.arrivalMs);
    expect(records[firstDeadline + 1]!.arrivalMs).toBeGreaterThanOrEqual(records[firstDeadline]!.arrivalMs);
  });

  it('knows a day-closed record from the local midnight ending its date', async () => {
    const h = writeSmallHistory({ days: 7 });
    writeFileSync(path.join(h.dir, 'day-closes.ndjson'), `${JSON.stringify({ eventId: 'd1', location: 'DC-NORTH', date: '2026-03-03' })}\n`);
    const { records } = await read(h.dir);
    const dc = records.find((r) => r.kind === 'day-closed')!;
    expect(dc.knowledgeMs).toBe(Date.parse('2026-03-03T23:00:00Z'));
  });

  it('accepts the same history as CSV', async () => {
    const h = writeSmallHistory({ days: 7 });
    const header = 'eventId,orderId,lineId,revision,op,location,item,quantity,orderedAt,requestedDate,customer';
    const csv = [header, ...h.orders.map((o) => header.split(',').map((k) => String(o[k] ?? '')).join(','))].join('\r\n');
    const { rmSync } = await import('node:fs');
    const ndjson = await read(h.dir);
    rmSync(path.join(h.dir, 'orders.ndjson'));
    writeFileSync(path.join(h.dir, 'orders.csv'), csv);
    const fromCsv = await read(h.dir);
    const strip = (rs: EventLogRecord[]) => rs.map((r) => ({ ...r, source: null }));
    expect(strip(fromCsv.records)).toEqual(strip(ndjson.records));
  });
});
