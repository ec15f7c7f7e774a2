import { describe, expect, it } from 'vitest';
import { RecordValidator } from '../../../src/contracts/validate.ts';
import { createCoreModels } from '../../../src/runtime/core-location-model.ts';
import type { EventLogRecord } from '../../../src/runtime/event-log-record.ts';
import { historyStream } from '../../../src/runtime/history/history-stream.ts';
import { createSensingStage } from '../../../src/runtime/sensing-stage.ts';
import { DEFAULT_STAGE_SETTINGS } from '../../../src/runtime/stage-settings.ts';
import type { ChangelogEntry } from '../../../src/runtime/stage-output.ts';
import { writeSmallHistory } from './fixtures/history-dir.ts';

async function records(dir: string): Promise<EventLogRecord[]> {
  const out: EventLogRecord[] = [];
  for await (const r of historyStream(dir, { validator: new RecordValidator(), settings: DEFAULT_STAGE_SETTINGS, onRejected: () => {} })) out.push(r);
  return out;
}

const models = createCoreModels({ demandBasis: 'orders' });
const stage = () => createSensingStage({ partition: 0, models });

describe('the core engine behind the stage', () => {
  it('saves a location in parts and rewrites only the series a batch touched', async () => {
    const all = await records(writeSmallHistory({ days: 21 }).dir);
    const s = stage();
    const first = s.apply(all.slice(0, -1).map((record, i) => ({ offset: String(i), record })));
    s.commit();
    expect(first.changelog.map((e) => e.key)).toEqual(expect.arrayContaining(['DC-NORTH', 'DC-NORTH|s:COLA-1L', 'DC-NORTH|s:WATER-STILL-500', 'DC-NORTH|c:COLA-1L']));
    // The last record is one order line of one item, closing no day: the base and that item's rows are written.
    const last = all.at(-1)!;
    expect(last.kind).toBe('order-line');
    const second = s.apply([{ offset: String(all.length - 1), record: last }]);
    expect(second.closes).toEqual([]);
    expect(second.changelog.map((e) => e.key)).toEqual(['DC-NORTH', `DC-NORTH|s:${(last.record as { item: string }).item}`, '#partition']);
  });

  it('restored from its parts after every batch, publishes exactly what it publishes uninterrupted', async () => {
    const all = await records(writeSmallHistory({ days: 28, stallOn: '2026-03-10' }).dir);
    const entries = all.map((record, i) => ({ offset: String(i), record }));
    const straight = stage();
    const expected = straight.apply(entries).outputs.map((o) => JSON.stringify(o));
    const changelog: ChangelogEntry[] = [];
    const got: string[] = [];
    for (let from = 0; from < entries.length; from += 37) {
      const s = stage();
      s.restore(changelog);
      const r = s.apply(entries.slice(from, from + 37));
      s.commit();
      changelog.push(...r.changelog);
      got.push(...r.outputs.map((o) => JSON.stringify(o)));
    }
    expect(expected.length).toBeGreaterThan(40);
    expect(got).toEqual(expected);
  });
});
