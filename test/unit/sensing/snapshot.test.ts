import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { Table } from '../../../src/sensing/columns.ts';
import { restoreLocationState, snapshotLocationState } from '../../../src/sensing/snapshot.ts';
import { dayOf, generateScenario } from './helpers/scenario.ts';
import { applyRecord, planAt, stateOf } from './helpers/run.ts';

// A restore must give back the state it was saved from: the reference is a state that was never saved, fed the
// same records. Continuing to apply records after the restore checks the rebuilt indexes (line heads, event ids)
// and the growth of the tables loaded at their exact size.
describe('restoreLocationState', () => {
  it('gives the state it was saved from: same snapshot, same plans, same outcome for every later record', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), fc.double({ min: 0, max: 1, noNaN: true }), fc.boolean(), (seed, cut, withShipments) => {
        const series = [2, 9].map((perDay, i) => ({ item: `TONIC-${i}`, perDay, noise: 0.2, earlyShare: 0.3, reviseShare: 0.4 }));
        const sc = generateScenario({ seed, weeks: 5, series, withShipments });
        const split = Math.floor(cut * sc.records.length);
        const reference = stateOf(sc, undefined, sc.records.slice(0, split));
        const restored = restoreLocationState(JSON.parse(JSON.stringify(snapshotLocationState(reference))));
        expect(JSON.stringify(snapshotLocationState(restored))).toBe(JSON.stringify(snapshotLocationState(reference)));
        // Records already applied are duplicates for both; the rest apply alike.
        for (const r of sc.records) expect(applyRecord(restored, r)).toEqual(applyRecord(reference, r));
        expect(JSON.stringify(snapshotLocationState(restored))).toBe(JSON.stringify(snapshotLocationState(reference)));
        expect(JSON.stringify(planAt(restored, dayOf(sc, 4, 2)))).toBe(JSON.stringify(planAt(reference, dayOf(sc, 4, 2))));
      }),
      { numRuns: 12, seed: 20_261_202 },
    );
  });

  it('refuses a line naming a customer the snapshot does not list', () => {
    const sc = generateScenario({ seed: 5, weeks: 2, series: [{ item: 'TONIC-0', perDay: 5 }] });
    const snap = JSON.parse(JSON.stringify(snapshotLocationState(stateOf(sc))));
    snap.customers = [];
    expect(() => restoreLocationState(snap)).toThrow(/names an unknown customer/);
  });
});

describe('Table.fromColumns', () => {
  it('copies the columns given into one buffer, makes the unsaved ones with their value, and refuses missing, ragged or mistyped columns', () => {
    const spec = { a: 'f64', b: 'i32', idx: 'i32' } as const;
    const a = Float64Array.of(1.5, 2.5, 3.5);
    const t = Table.fromColumns(spec, { a, b: Int32Array.of(4, 5, 6) }, { idx: -1 })!;
    expect(t.length).toBe(3);
    a[0] = 99; // the caller's array (scratch space in a restore) may be reused at once
    expect([...t.cols.a]).toEqual([1.5, 2.5, 3.5]);
    expect(t.cols.b.buffer).toBe(t.cols.a.buffer);
    expect([...t.cols.idx]).toEqual([-1, -1, -1]);
    t.push({ a: 7, b: 8, idx: 2 });
    expect(t.toJSON()).toEqual({ a: [1.5, 2.5, 3.5, 7], b: [4, 5, 6, 8], idx: [-1, -1, -1, 2] });
    expect(Table.fromColumns(spec, { a: Float64Array.of(1), b: Int32Array.of(1, 2) }, { idx: -1 })).toBeUndefined();
    expect(Table.fromColumns(spec, { a: Float64Array.of(1), b: Int32Array.of(1) })).toBeUndefined();
    expect(Table.fromColumns(spec, { a: Int32Array.of(1), b: Int32Array.of(1) }, { idx: -1 })).toBeUndefined();
    expect(Table.fromColumns(spec, {}, { idx: 0 })).toBeUndefined();
  });
});
