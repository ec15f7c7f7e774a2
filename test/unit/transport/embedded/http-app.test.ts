import { createHash } from 'node:crypto';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { loadConfig } from '../../../../src/config/config.ts';
import { RecordValidator } from '../../../../src/contracts/validate.ts';
import { EmbeddedRuntime } from '../../../../src/transport/embedded/embedded-runtime.ts';
import { EmbeddedStore } from '../../../../src/transport/embedded/embedded-store.ts';
import { buildHttpApp } from '../../../../src/transport/embedded/http-app.ts';
import { LiveClock } from '../../../../src/transport/embedded/live-clock.ts';
import { orderBookModels } from '../../runtime/fixtures/order-book-model.ts';
import { DC } from '../../runtime/fixtures/records.ts';

const sha = (t: string) => createHash('sha256').update(t).digest('hex');
let stores: EmbeddedStore[] = [];
afterEach(() => {
  for (const s of stores) s.close();
  stores = [];
});

function app(tokens: { name: string; sha256: string; scopes: string[] }[] = [], nowIso = '2026-03-02T12:00:00Z') {
  const store = new EmbeddedStore(path.join(mkdtempSync(path.join(tmpdir(), 'nc-http-')), 'db.sqlite'));
  stores.push(store);
  const runtime = new EmbeddedRuntime({ store, models: orderBookModels });
  let now = Date.parse(nowIso);
  const clock = new LiveClock(runtime, () => now);
  const config = loadConfig({ overrides: { tokens } });
  return { app: buildHttpApp({ runtime, validator: new RecordValidator(), config, clock, now: () => now }), store, clock, setNow: (iso: string) => (now = Date.parse(iso)) };
}

const line = (n: number, orderedAt: string) => ({ eventId: `h${n}`, orderId: `o${n}`, lineId: '1', revision: 1, op: 'upsert', location: 'DC-NORTH', item: 'COLA-1L', quantity: n, orderedAt, requestedDate: '2026-03-04' });

describe('embedded HTTP routes', () => {
  it('answers health and readiness', async () => {
    const { app: a } = app();
    expect((await a.inject({ url: '/health' })).json()).toEqual({ status: 'ok' });
    expect((await a.inject({ url: '/ready' })).statusCode).toBe(200);
  });

  it('ingests JSON and NDJSON bodies, reports each refused record with its index and field, and serves the committed plans', async () => {
    const t = app();
    expect((await t.app.inject({ method: 'POST', url: '/v1/ingest/location', payload: DC })).json()).toEqual({ accepted: 1, rejected: [] });
    const ndjson = [JSON.stringify(line(3, '2026-03-02T10:00:00+01:00')), '', JSON.stringify({ ...line(4, '2026-03-02T11:00:00+01:00'), quantity: 'many' })].join('\n');
    const res = await t.app.inject({ method: 'POST', url: '/v1/ingest/order-line', payload: ndjson, headers: { 'content-type': 'application/x-ndjson' } });
    expect(res.statusCode).toBe(200);
    expect(res.json()).toMatchObject({ accepted: 1, rejected: [{ index: 1, code: 'NEARCAST_INPUT_INVALID', issues: [{ path: 'quantity', message: 'must be a number' }] }] });
    expect(t.store.deadLetters()).toHaveLength(1);
    // The next morning's order, arriving then, passes the watermark: Monday closes and its plan is served.
    t.setNow('2026-03-03T07:01:00Z');
    await t.app.inject({ method: 'POST', url: '/v1/ingest/order-line', payload: [line(5, '2026-03-03T08:00:00+01:00')] });
    const plans = (await t.app.inject({ url: '/v1/plans?location=DC-NORTH' })).json() as { items: { item: string; planDate: string }[] };
    expect(plans.items.map((p) => [p.item, p.planDate])).toEqual([['COLA-1L', '2026-03-02']]);
    const manifests = (await t.app.inject({ url: '/v1/manifests?location=DC-NORTH' })).json() as { items: { seriesCount: number }[] };
    expect(manifests.items).toMatchObject([{ seriesCount: 1 }]);
  });

  it('refuses an unknown type with a problem document', async () => {
    const res = await app().app.inject({ method: 'POST', url: '/v1/ingest/deadline-close', payload: {} });
    expect(res.statusCode).toBe(400);
    expect(res.json()).toMatchObject({ code: 'NEARCAST_INPUT_UNKNOWN_TYPE', status: 400 });
  });

  it('with tokens configured, needs one, checks its scope, and answers 404 for another location', async () => {
    const t = app([
      { name: 'feeder', sha256: sha('feed-token'), scopes: ['ingest'] },
      { name: 'dc-south', sha256: sha('south-token'), scopes: ['read:DC-SOUTH'] },
    ]);
    expect((await t.app.inject({ method: 'POST', url: '/v1/ingest/location', payload: DC })).statusCode).toBe(401);
    expect((await t.app.inject({ method: 'POST', url: '/v1/ingest/location', payload: DC, headers: { authorization: 'Bearer south-token' } })).statusCode).toBe(403);
    expect((await t.app.inject({ method: 'POST', url: '/v1/ingest/location', payload: DC, headers: { authorization: 'Bearer feed-token' } })).statusCode).toBe(200);
    expect((await t.app.inject({ url: '/v1/plans?location=DC-NORTH', headers: { authorization: 'Bearer south-token' } })).statusCode).toBe(404);
    expect((await t.app.inject({ url: '/v1/plans?location=DC-SOUTH', headers: { authorization: 'Bearer south-token' } })).statusCode).toBe(200);
  });

  it('lets the live clock close a quiet day at its deadline by writing a deadline-close record', async () => {
    const t = app();
    await t.app.inject({ method: 'POST', url: '/v1/ingest/location', payload: DC });
    await t.app.inject({ method: 'POST', url: '/v1/ingest/order-line', payload: line(3, '2026-03-02T10:00:00+01:00') });
    const kinds = () => (t.store.db.prepare('SELECT kind FROM event_log ORDER BY off').all() as { kind: string }[]).map((k) => k.kind);
    t.setNow('2026-03-03T02:59:00Z');
    t.clock.tick();
    // The order arrived at 12:00Z = 13:00 Berlin; Monday's hourly checks after it (14:00–19:00) are written, no deadline.
    expect(kinds().filter((k) => k === 'feed-health-check')).toHaveLength(6);
    expect(kinds()).not.toContain('deadline-close');
    expect((await t.app.inject({ url: '/v1/plans?location=DC-NORTH' })).json()).toMatchObject({ items: [] });
    t.setNow('2026-03-03T03:00:00Z'); // 04:00 in Berlin, the default deadline
    t.clock.tick();
    expect(kinds().filter((k) => k === 'deadline-close')).toHaveLength(1);
    expect((await t.app.inject({ url: '/v1/plans?location=DC-NORTH' })).json()).toMatchObject({ items: [{ planDate: '2026-03-02' }] });
  });
});
