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

  it('leaves the weekly prune to the record after the close that completes a week, and restored between the two publishes the same', async () => {
    const all = await records(writeSmallHistory({ days: 230 }).dir);
    const entries = all.map((record, i) => ({ offset: String(i), record }));
    const expected = stage()
      .apply(entries)
      .outputs.map((o) => JSON.stringify(o));
    const running = stage();
    const changelog: ChangelogEntry[] = [];
    const got: string[] = [];
    const fullSaveBytes = new Map<string, number>();
    let due: { at: number; day: number } | undefined;
    let prunesChecked = 0;
    for (let i = 0; i < entries.length; i++) {
      const r = running.apply([entries[i]!]);
      running.commit();
      changelog.push(...r.changelog);
      got.push(...r.outputs.map((o) => JSON.stringify(o)));
      const base = JSON.parse(r.changelog.find((e) => e.key === 'DC-NORTH')?.value ?? 'null') as { model: { pruneDue?: number } } | null;
      const fullSaves = r.changelog.filter((e) => e.key.startsWith('DC-NORTH|f:'));
      if (base?.model.pruneDue !== undefined) {
        // The close that completed a week: its plans and manifest went out, no series was saved in full again.
        expect(r.closes.length).toBe(1);
        expect(fullSaves).toEqual([]);
        due = { at: i, day: base.model.pruneDue };
        continue;
      }
      if (due && base && entries[i]!.record.kind === 'order-line') {
        // The next fact ran the prune first: once the oldest lines are past the retention window, every series
        // is saved in full again, shorter than before.
        if (fullSaves.length === 2 && fullSaves.every((e) => (e.value?.length ?? 0) < fullSaveBytes.get(e.key)!)) {
          prunesChecked++;
          if (prunesChecked === 1) {
            const restored = stage();
            restored.restore(changelog.slice(0, changelog.length - r.changelog.length));
            const rest = restored.apply(entries.slice(i));
            expect(rest.outputs.map((o) => JSON.stringify(o))).toEqual(expected.slice(got.length - r.outputs.length));
          }
        }
        due = undefined;
      }
      for (const e of fullSaves) fullSaveBytes.set(e.key, e.value?.length ?? 0);
    }
    expect(prunesChecked).toBeGreaterThanOrEqual(3);
    expect(got).toEqual(expected);
  });
});
