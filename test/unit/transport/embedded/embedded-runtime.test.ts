import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { RecordValidator } from '../../../../src/contracts/validate.ts';
import { runBacktest } from '../../../../src/runtime/backtest/run-backtest.ts';
import { EmbeddedRuntime } from '../../../../src/transport/embedded/embedded-runtime.ts';
import { EmbeddedStore } from '../../../../src/transport/embedded/embedded-store.ts';
import { feedHistory } from '../../../../src/transport/embedded/history-feed.ts';
import { orderBookModels } from '../../runtime/fixtures/order-book-model.ts';
import { writeSmallHistory } from '../../runtime/fixtures/history-dir.ts';
import { locationRecord, order } from '../../runtime/fixtures/records.ts';

const fresh = () => path.join(mkdtempSync(path.join(tmpdir(), 'nc-emb-')), 'nearcast.sqlite');

describe('the embedded runtime on SQLite', () => {
  it('publishes exactly what the in-memory backtest publishes for the same history, in the same order', async () => {
    const h = writeSmallHistory({ days: 21, stallOn: '2026-03-10', baseline: 1 });
    const out = mkdtempSync(path.join(tmpdir(), 'nc-emb-bt-'));
    await runBacktest({ input: h.dir, out, models: orderBookModels });
    const store = new EmbeddedStore(fresh(), { partitions: 3 });
    await feedHistory(new EmbeddedRuntime({ store, models: orderBookModels }), h.dir, { validator: new RecordValidator() });
    const plans = store.outputs('plans').filter((o) => !o.key.endsWith('#manifest')).map((o) => o.data);
    store.close();
    expect(plans).toEqual(readFileSync(path.join(out, 'plans.ndjson'), 'utf8').trim().split('\n'));
  });

  it('keeps the partition count of a database and refuses to reopen it with another', () => {
    const file = fresh();
    new EmbeddedStore(file, { partitions: 4 }).close();
    expect(() => new EmbeddedStore(file, { partitions: 2 })).toThrow(/created with 4 partitions, not 2/);
    const again = new EmbeddedStore(file);
    expect(again.partitions).toBe(4);
    again.close();
  });

  it('picks up after a restart from the committed offset, without repeating outputs', () => {
    const file = fresh();
    const records = [locationRecord(), order('COLA-1L', 3, '2026-03-02T10:00:00+01:00', '2026-03-03'), order('COLA-1L', 4, '2026-03-03T10:00:00+01:00', '2026-03-04')];
    const s1 = new EmbeddedStore(file);
    const r1 = new EmbeddedRuntime({ store: s1, models: orderBookModels });
    r1.append(records);
    expect(r1.pump().map((c) => c.planDate)).toEqual(['2026-03-02']);
    s1.close();
    const s2 = new EmbeddedStore(file);
    const r2 = new EmbeddedRuntime({ store: s2, models: orderBookModels });
    expect(r2.caughtUp()).toBe(true);
    r2.append([order('COLA-1L', 5, '2026-03-04T10:00:00+01:00', '2026-03-05')]);
    expect(r2.pump().map((c) => c.planDate)).toEqual(['2026-03-03']);
    expect(s2.outputs('plans').map((o) => o.key)).toEqual(['DC-NORTH|COLA-1L', 'DC-NORTH|#manifest', 'DC-NORTH|COLA-1L', 'DC-NORTH|#manifest']);
    s2.close();
  });

  it('rolls a failed sensing transaction back completely and applies the batch again on the next pump', () => {
    const store = new EmbeddedStore(fresh());
    let fail = true;
    const runtime = new EmbeddedRuntime({
      store,
      models: orderBookModels,
      fault: (p) => {
        if (p === 'changelog-written' && fail) throw new Error('disk full');
      },
    });
    runtime.append([locationRecord(), order('COLA-1L', 3, '2026-03-02T10:00:00+01:00', '2026-03-03'), order('COLA-1L', 4, '2026-03-03T10:00:00+01:00', '2026-03-04')]);
    expect(() => runtime.pump()).toThrow('disk full');
    expect(store.outputs('plans')).toEqual([]);
    expect(runtime.caughtUp()).toBe(false);
    fail = false;
    expect(runtime.pump().map((c) => c.planDate)).toEqual(['2026-03-02']);
    expect(store.outputs('plans')).toHaveLength(2);
    store.close();
  });
});
