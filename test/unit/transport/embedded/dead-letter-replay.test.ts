import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { RecordValidator } from '../../../../src/contracts/validate.ts';
import { replayDeadLetters } from '../../../../src/transport/embedded/dead-letter-replay.ts';
import { EmbeddedRuntime } from '../../../../src/transport/embedded/embedded-runtime.ts';
import { EmbeddedStore } from '../../../../src/transport/embedded/embedded-store.ts';
import { orderBookModels } from '../../runtime/fixtures/order-book-model.ts';
import { locationRecord, order } from '../../runtime/fixtures/records.ts';

describe('dead-letter replay', () => {
  it('replays records of an unknown location once its master data arrives, and removes them from quarantine', () => {
    const store = new EmbeddedStore(path.join(mkdtempSync(path.join(tmpdir(), 'nc-dl-')), 'db.sqlite'));
    const runtime = new EmbeddedRuntime({ store, models: orderBookModels });
    const validator = new RecordValidator();
    // Orders before the master data: quarantined as NEARCAST_INPUT_UNKNOWN_LOCATION by the sensing stage.
    runtime.append([order('COLA-1L', 3, '2026-03-02T10:00:00+01:00', '2026-03-03')]);
    runtime.pump();
    expect(store.deadLetters().map((d) => d.record.code)).toEqual(['NEARCAST_INPUT_UNKNOWN_LOCATION']);

    // Replaying before the fix puts it straight back.
    expect(replayDeadLetters(runtime, validator, { arrivalMs: Date.parse('2026-03-02T11:00:00Z') })).toEqual({ replayed: 1, accepted: 0, stillRefused: 0, stillDead: 1 });
    expect(store.deadLetters()).toHaveLength(1);

    runtime.append([locationRecord()]);
    runtime.pump();
    expect(replayDeadLetters(runtime, validator, { arrivalMs: Date.parse('2026-03-02T12:00:00Z') })).toEqual({ replayed: 1, accepted: 1, stillRefused: 0, stillDead: 0 });
    expect(store.deadLetters()).toEqual([]);
    runtime.append([order('COLA-1L', 1, '2026-03-03T10:00:00+01:00', '2026-03-04')]);
    runtime.pump();
    const plan = JSON.parse(store.outputs('plans')[0]!.data) as { leads: { explanation: { orderBook: number } }[] };
    expect(plan.leads[0]!.explanation.orderBook).toBe(3);
    store.close();
  });
});
