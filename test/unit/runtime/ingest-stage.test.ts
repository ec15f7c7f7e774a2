import { describe, expect, it } from 'vitest';
import { RecordValidator } from '../../../src/contracts/validate.ts';
import { decodeEventLogRecord, encodeEventLogRecord } from '../../../src/runtime/event-log-record.ts';
import { ingest } from '../../../src/runtime/ingest-stage.ts';

const validator = new RecordValidator();
const source = { kind: 'topic', topic: 'nearcast.orders.v1', partition: 2, offset: '41' } as const;
const arrivalMs = Date.parse('2026-03-02T12:00:00Z');
const line = { eventId: 'e1', orderId: 'o1', lineId: '1', revision: 2, op: 'upsert', location: 'DC-NORTH', item: 'COLA-1L', quantity: 5, orderedAt: '2026-03-01T10:00:00+01:00', changedAt: '2026-03-02T09:30:00+01:00', requestedDate: '2026-03-04' };

describe('the ingest stage', () => {
  it('wraps a valid record in the event-log envelope, known from changedAt for a revision', () => {
    const r = ingest({ type: 'order-line', value: JSON.stringify(line), source, arrivalMs }, validator);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.record).toMatchObject({ v: 1, kind: 'order-line', location: 'DC-NORTH', arrivalMs, source, knowledgeMs: Date.parse('2026-03-02T08:30:00Z') });
    expect(decodeEventLogRecord(encodeEventLogRecord(r.record))).toEqual(r.record);
  });

  it('dead-letters a bad record with its code, field paths, source and original text', () => {
    const text = JSON.stringify({ ...line, quantity: -1, requestedDate: '2026-02-30' });
    const r = ingest({ type: 'order-line', value: text, source, arrivalMs }, validator);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.deadLetter).toMatchObject({ code: 'NEARCAST_INPUT_INVALID', stage: 'ingest', source, location: 'DC-NORTH', raw: text, retriable: false });
    expect(r.deadLetter.issues.map((i) => i.path).sort()).toEqual(['quantity', 'requestedDate']);
    expect(r.deadLetter.reason).toMatch(/^The record does not match its contract: /);
  });

  it('names malformed JSON without echoing it, and an unknown type', () => {
    const bad = ingest({ type: 'order-line', value: '{"secret": "s3cr3t", oops', source, arrivalMs }, validator);
    expect(!bad.ok && bad.deadLetter.code).toBe('NEARCAST_INPUT_MALFORMED_JSON');
    expect(!bad.ok && bad.deadLetter.reason).not.toContain('s3cr3t');
    const unknown = ingest({ type: 'invoice', value: '{}', source, arrivalMs }, validator);
    expect(!unknown.ok && unknown.deadLetter.code).toBe('NEARCAST_INPUT_UNKNOWN_TYPE');
  });

  it('accepts planner commands for the event log and requires a date to snooze', () => {
    const cmd = { commandId: 'c1', location: 'DC-NORTH', alertId: 'DC-NORTH|COLA-1L|spike|2026-03-02', action: 'snooze', atMs: arrivalMs };
    const refused = ingest({ type: 'alert-command', value: JSON.stringify(cmd), source, arrivalMs }, validator);
    expect(!refused.ok && refused.deadLetter.issues).toEqual([{ path: 'until', message: 'is required to snooze' }]);
    const ok = ingest({ type: 'alert-command', value: JSON.stringify({ ...cmd, until: '2026-03-05' }), source, arrivalMs }, validator);
    expect(ok.ok && ok.record.kind).toBe('alert-command');
  });
});
