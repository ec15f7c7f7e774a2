import { describe, expect, it } from 'vitest';
import { RecordValidator } from '../../../../src/contracts/validate.ts';
import { createCoreModels } from '../../../../src/runtime/core-location-model.ts';
import { joinTail, seriesSave, type SeriesSnapshot } from '../../../../src/runtime/core/series-tail.ts';
import { decodeColumn, encodeSeries, type SeriesColumns } from '../../../../src/sensing/index.ts';
import type { EventLogRecord } from '../../../../src/runtime/event-log-record.ts';
import { historyStream } from '../../../../src/runtime/history/history-stream.ts';
import { createSensingStage } from '../../../../src/runtime/sensing-stage.ts';
import { DEFAULT_STAGE_SETTINGS } from '../../../../src/runtime/stage-settings.ts';
import type { ChangelogEntry } from '../../../../src/runtime/stage-output.ts';
import { writeSmallHistory } from '../fixtures/history-dir.ts';

const baseline = { version: 1, eventHash: 5, publishedMs: 1, knownMs: 1, knownDay: 0, weeks: Int32Array.of(20_000), quantities: Float64Array.of(70) };
const snap = (knownMs: number[], shipped: number[] = []): SeriesColumns => ({
  item: 'COLA-1L',
  lines: { knownMs: Float64Array.from(knownMs), quantity: Float64Array.from(knownMs.map((k) => k % 7)) },
  shipments: { knownMs: Float64Array.from(shipped) },
  baselines: [baseline],
});
/** A snapshot entry with every column as a plain list, whichever form it was saved in. */
const asLists = (e: SeriesSnapshot) => {
  const lists = (cols: Record<string, string | number[]>) => Object.fromEntries(Object.entries(cols).map(([k, v]) => [k, typeof v === 'string' ? decodeColumn(v) : v]));
  return { ...e, lines: lists(e.lines), shipments: lists(e.shipments) };
};

describe('series saved as a full save plus the rows after it', () => {
  it('saves only the appended rows while the saved rows stay a prefix, and joins back to the whole', () => {
    const first = seriesSave(snap([10, 20, 30]), undefined);
    expect(first.kind).toBe('full');
    if (first.kind !== 'full') return;
    const now = snap([10, 20, 30, 40, 50], [60]);
    const next = seriesSave(now, first.save);
    expect(next.kind).toBe('tail');
    if (next.kind !== 'tail') return;
    // The tail is written in the sensing state's compact column form; decoded, it is exactly the appended rows.
    const decoded = (cols: Record<string, string>) => Object.fromEntries(Object.entries(cols).map(([k, v]) => [k, decodeColumn(v)]));
    expect(decoded(next.tail.lines)).toEqual({ knownMs: [40, 50], quantity: [5, 1] });
    expect(decoded(next.tail.shipments)).toEqual({ knownMs: [60] });
    expect(asLists(joinTail(first.full, next.tail))).toEqual(asLists(encodeSeries(now)));
    expect(asLists(joinTail(first.full, next.tail)).lines).toEqual({ knownMs: [10, 20, 30, 40, 50], quantity: [3, 6, 2, 5, 1] });
  });

  it('refuses a damaged tail column with the state-corrupt error rather than restoring fewer rows', () => {
    const first = seriesSave(snap([10, 20, 30]), undefined);
    if (first.kind !== 'full') throw new Error('expected a full save');
    expect(() => joinTail(first.full, { tail: 1, lines: { knownMs: '#not-a-column', quantity: '#not-a-column' }, shipments: {} })).toThrow(
      expect.objectContaining({ code: 'NEARCAST_STATE_CORRUPT' }),
    );
  });

  it('saves in full again when a saved row changed, a row sorts earlier, or a baseline arrived or changed', () => {
    const first = seriesSave(snap([10, 20, 30]), undefined);
    if (first.kind !== 'full') throw new Error('expected a full save');
    expect(seriesSave(snap([10, 15, 20, 30]), first.save).kind).toBe('full');
    expect(seriesSave(snap([20, 30]), first.save).kind).toBe('full');
    const rebased = { ...snap([10, 20, 30, 40]), baselines: [] };
    expect(seriesSave(rebased, first.save).kind).toBe('full');
    const revised = { ...snap([10, 20, 30, 40]), baselines: [{ ...baseline, quantities: Float64Array.of(71) }] };
    expect(seriesSave(revised, first.save).kind).toBe('full');
    const changed = snap([10, 20, 30, 40]);
    changed.lines.quantity![1] = 99;
    expect(seriesSave(changed, first.save).kind).toBe('full');
    expect(seriesSave(snap([10, 20, 30, 40]), first.save).kind).toBe('tail');
  });

  it('saves in full again once the rows after it outgrow half the full save (at least 16 rows)', () => {
    const base = Array.from({ length: 40 }, (_, i) => i + 1);
    const first = seriesSave(snap(base), undefined);
    if (first.kind !== 'full') throw new Error('expected a full save');
    expect(seriesSave(snap([...base, ...Array.from({ length: 20 }, (_, i) => 100 + i)]), first.save).kind).toBe('tail');
    expect(seriesSave(snap([...base, ...Array.from({ length: 21 }, (_, i) => 100 + i)]), first.save).kind).toBe('full');
  });
});

async function records(dir: string): Promise<EventLogRecord[]> {
  const out: EventLogRecord[] = [];
  for await (const r of historyStream(dir, { validator: new RecordValidator(), settings: DEFAULT_STAGE_SETTINGS, onRejected: () => {} })) out.push(r);
  return out;
}

describe('a stage restored from a changelog of full saves and tails', () => {
  it('writes tails in a long run and, restored from them at any point, publishes what it publishes uninterrupted', async () => {
    const models = createCoreModels({ demandBasis: 'orders' });
    const all = await records(writeSmallHistory({ days: 28, stallOn: '2026-03-10' }).dir);
    const entries = all.map((record, i) => ({ offset: String(i), record }));
    const straight = createSensingStage({ partition: 0, models });
    const expected = straight.apply(entries).outputs.map((o) => JSON.stringify(o));

    // One long-lived stage in batches of 23 (so its series are saved as tails), then a fresh stage restored from
    // what it wrote, at several points of the history.
    const running = createSensingStage({ partition: 0, models });
    const changelog: ChangelogEntry[] = [];
    const got: string[] = [];
    const cutAt = new Set([5, 11, 17]);
    let tails = 0;
    for (let b = 0, from = 0; from < entries.length; b++, from += 23) {
      const r = running.apply(entries.slice(from, from + 23));
      running.commit();
      changelog.push(...r.changelog);
      tails += r.changelog.filter((e) => e.key.includes('|s:') && !r.changelog.some((f) => f.key === e.key.replace('|s:', '|f:'))).length;
      got.push(...r.outputs.map((o) => JSON.stringify(o)));
      if (!cutAt.has(b)) continue;
      const restored = createSensingStage({ partition: 0, models });
      restored.restore(changelog);
      const rest = restored.apply(entries.slice(from + 23));
      expect(rest.outputs.map((o) => JSON.stringify(o))).toEqual(expected.slice(got.length));
    }
    expect(tails).toBeGreaterThan(0);
    expect(got).toEqual(expected);

    // A damaged part fails the restore with the state-corrupt error naming that entry, not a generic one.
    const broken = changelog.find((e) => e.key.includes('|s:'))!.key;
    const damaged = changelog.map((e) => (e.key === broken && e.value !== null ? { ...e, value: e.value.slice(0, -3) } : e));
    expect(() => createSensingStage({ partition: 0, models }).restore(damaged)).toThrow(
      expect.objectContaining({ code: 'NEARCAST_STATE_CORRUPT', message: expect.stringContaining(`changelog entry ${broken} is not JSON`) }),
    );
  });
});
