import { describe, expect, it } from 'vitest';
import { orderLineSchema } from '../../../src/contracts/order-line.ts';
import { DEFAULT_INPUT_LIMITS } from '../../../src/contracts/primitives.ts';
import { fastOrderLineCheck, fastShipmentCheck, type FastCheck } from '../../../src/contracts/record-fast-checks.ts';
import { shipmentSchema } from '../../../src/contracts/shipment.ts';
import { goodOrderLine, goodShipment } from './samples.ts';

// The fast checks must never accept what the zod schema refuses, and what they accept must be exactly the schema's
// output (same fields, same order, so the event log's bytes do not change). Judged here on records generated from
// valid ones with fields replaced by edge values, removed, or added.

// mulberry32: a small seeded generator whose low bits are as random as its high ones.
let seed = 20260302;
const next = (n: number) => {
  seed = (seed + 0x6d2b79f5) | 0;
  let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
  t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
  return Math.floor((((t ^ (t >>> 14)) >>> 0) / 4294967296) * n);
};
const pick = <T>(values: readonly T[]): T => values[next(values.length)]!;

const EDGE_VALUES: readonly unknown[] = [
  '', 'A', 'x'.repeat(64), 'x'.repeat(65), 'bad id', '-lead', 'ok.id:1_2-3', 'DC-NORTH', 'ÄPFEL',
  '2026-03-05', '2026-02-29', '2024-02-29', '1999-12-31', '2099-12-31', '2100-01-01', '2026-3-05',
  '2026-03-02T08:15:00Z', '2026-03-01T08:15:00+01:00', '2026-03-09T08:15:00.25Z', '1999-12-31T23:59:59Z',
  '2100-01-01T00:00:00Z', '2099-12-31T23:59:59Z', '2026-03-02T08:15:00', '2025-01-01T00:00:00Z', '2027-12-31T00:00:00Z',
  'upsert', 'cancel', 'UPSERT', 0, 1, 2, 3, -1, 1.5, 2_147_483_647, 2_147_483_648, 10_000_000, 10_000_001, -0,
  Number.NaN, Number.POSITIVE_INFINITY, null, undefined, true, {}, [], ['a'],
];

function mutate(base: Record<string, unknown>, fields: readonly string[]): Record<string, unknown> {
  const r: Record<string, unknown> = { ...base };
  for (let i = next(4); i > 0; i--) {
    const kind = next(10);
    if (kind < 7) r[pick(fields)] = pick(EDGE_VALUES);
    else if (kind < 9) delete r[pick(fields)];
    else r[`extra${next(3)}`] = pick(EDGE_VALUES);
  }
  return r;
}

function holdsToSchema(check: FastCheck<unknown>, schema: { safeParse(v: unknown): { success: boolean; data?: unknown } }, records: Iterable<Record<string, unknown>>) {
  let accepted = 0;
  let fastAccepted = 0;
  for (const record of records) {
    const parsed = schema.safeParse(record);
    const fast = check(record);
    if (parsed.success) accepted++;
    if (fast === undefined) continue;
    fastAccepted++;
    expect(parsed.success, JSON.stringify(record)).toBe(true);
    expect(Object.keys(fast as object)).toEqual(Object.keys(parsed.data as object));
    expect(JSON.stringify(fast)).toBe(JSON.stringify(parsed.data));
  }
  return { accepted, fastAccepted };
}


function orderLineBase(i: number): Record<string, unknown> {
  const revision = 1 + next(3);
  const base: Record<string, unknown> = { ...goodOrderLine, eventId: `ev-${i}`, revision, op: pick(['upsert', 'cancel']) };
  if (revision > 1) base.changedAt = pick(['2026-03-03T09:00:00+01:00', '2026-03-02T08:15:00+01:00', '2026-03-02T07:00:00Z']);
  if (next(3) === 0) delete base.customer;
  if (base.op === 'cancel' && next(2) === 0) delete base.quantity;
  return base;
}

function shipmentBase(i: number): Record<string, unknown> {
  const base: Record<string, unknown> = { ...goodShipment, eventId: `ev-${i}` };
  if (next(3) === 0) delete base.orderId;
  if (next(3) === 0) delete base.lineId;
  return base;
}

describe('fast record checks', () => {
  it.each([
    ['an order line', orderLineSchema(DEFAULT_INPUT_LIMITS), fastOrderLineCheck(DEFAULT_INPUT_LIMITS), orderLineBase, 30_000, 8_000],
    ['a shipment', shipmentSchema(DEFAULT_INPUT_LIMITS), fastShipmentCheck(DEFAULT_INPUT_LIMITS), shipmentBase, 20_000, 5_000],
  ] as const)('accept %s only as its schema does, with the same output', (_, schema, check, base, count, minAccepted) => {
    const fields = Object.keys(schema.shape);
    function* records() {
      for (let i = 0; i < count; i++) yield i % 4 === 0 ? base(i) : mutate(base(i), fields);
    }
    const { accepted, fastAccepted } = holdsToSchema(check, schema, records());
    // The fast path is the one taken for nearly every record the schema accepts.
    expect(accepted).toBeGreaterThan(minAccepted);
    expect(fastAccepted / accepted).toBeGreaterThan(0.95);
  });

  it('leave a present-but-undefined optional field and a span beyond the limit to the schema', () => {
    const check = fastOrderLineCheck(DEFAULT_INPUT_LIMITS);
    expect(check({ ...goodOrderLine, customer: undefined })).toBeUndefined();
    expect(check({ ...goodOrderLine, requestedDate: '2027-06-01' })).toBeUndefined();
    expect(check({ ...goodOrderLine })).toEqual(goodOrderLine);
  });
});
