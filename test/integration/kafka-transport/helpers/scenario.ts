import type { EventLogRecord } from '../../../../src/runtime/event-log-record.ts';

// Our own invented scenario for transport tests: a beverage distributor's three distribution centres, a few items,
// order lines over a few days and a day-closed record per centre and day. Seeded, so every run is the same.

export const LOCATIONS = ['DC-NORTH', 'DC-SOUTH', 'DC-COAST'] as const;
export const ITEMS = ['SPARK-LEMON-330', 'COLA-1L', 'TONIC-200', 'ICED-TEA-500'] as const;

/** mulberry32: a small seeded generator (common practice for reproducible test data). */
export function seeded(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4_294_967_296;
  };
}

export interface RawInput {
  readonly role: 'orders' | 'dayCloses' | 'locations' | 'shipments' | 'baselines' | 'commands';
  readonly key: string;
  readonly value: string;
}

export function locationRecord(location: string) {
  return { location, timeZone: 'Europe/Berlin', weekStart: 'monday', businessHours: { open: '06:00', close: '22:00' } };
}

function date(day: number): string {
  return `2026-03-${String(2 + day).padStart(2, '0')}`;
}

export function orderLine(i: number, location: string, item: string, quantity: number, day: number) {
  return {
    eventId: `ev-${i}`,
    orderId: `SO-${1000 + i}`,
    lineId: '1',
    revision: 1,
    op: 'upsert',
    location,
    item,
    quantity,
    orderedAt: `${date(day)}T09:${String(i % 60).padStart(2, '0')}:00+01:00`,
    requestedDate: date(day + 3),
  };
}

/** Raw input records as source systems would send them: master data, then per day the lines and the closes. */
export function rawScenario(seed: number, days: number, linesPerDay: number): RawInput[] {
  const rnd = seeded(seed);
  const out: RawInput[] = LOCATIONS.map((l) => ({ role: 'locations', key: l, value: JSON.stringify(locationRecord(l)) }));
  let i = 0;
  for (let d = 0; d < days; d++) {
    for (let n = 0; n < linesPerDay; n++, i++) {
      const location = LOCATIONS[Math.floor(rnd() * LOCATIONS.length)]!;
      const item = ITEMS[Math.floor(rnd() * ITEMS.length)]!;
      out.push({ role: 'orders', key: location, value: JSON.stringify(orderLine(i, location, item, 1 + Math.floor(rnd() * 200), d)) });
    }
    for (const l of LOCATIONS) out.push({ role: 'dayCloses', key: l, value: JSON.stringify({ eventId: `close-${l}-${d}`, location: l, date: date(d) }) });
  }
  return out;
}

/** The same scenario as event-log records, in one total order (for tests of the sensing stage alone). */
export function eventLogScenario(seed: number, days: number, linesPerDay: number): EventLogRecord[] {
  return rawScenario(seed, days, linesPerDay).map((r, line) => {
    const record = JSON.parse(r.value) as Record<string, unknown> & { location: string };
    const kind = r.role === 'locations' ? 'location' : r.role === 'orders' ? 'order-line' : 'day-closed';
    const atMs = Date.parse('2026-03-02T00:00:00Z') + line * 60_000;
    return { v: 1, kind, location: record.location, knowledgeMs: atMs, arrivalMs: atMs, source: { kind: 'file', file: 'scenario', line: line + 1 }, record } as EventLogRecord;
  });
}

/**
 * The demo's invented distributor (src/demo), cut to `weeks` weeks and the first `items` items, as raw input records
 * in knowledge-time order — the order a live feed would deliver them in.
 */
export async function demoInputs(weeks: number, items: number): Promise<RawInput[]> {
  const { DEMO_SCENARIO } = await import('../../../../src/demo/scenario.ts');
  const { ITEMS: DEMO_ITEMS } = await import('../../../../src/demo/catalogue.ts');
  const { generateHistory } = await import('../../../../src/demo/generate-history.ts');
  const h = generateHistory({ ...DEMO_SCENARIO, weeks }, { items: DEMO_ITEMS.slice(0, items) });
  type R = Record<string, unknown>;
  const at = (r: R): number => {
    const t = (r.changedAt ?? r.orderedAt ?? r.shippedAt ?? r.publishedAt) as string | undefined;
    return t ? Date.parse(t) : Date.parse(`${r.date as string}T23:30:00Z`);
  };
  const timed = [
    ...h.baselines.map((r) => ({ role: 'baselines' as const, r })),
    ...h.orders.map((r) => ({ role: 'orders' as const, r })),
    ...h.shipments.map((r) => ({ role: 'shipments' as const, r })),
    ...h.dayCloses.map((r) => ({ role: 'dayCloses' as const, r })),
  ].sort((a, b) => at(a.r) - at(b.r));
  const master: RawInput[] = h.locations.map((r) => ({ role: 'locations', key: r.location as string, value: JSON.stringify(r) }));
  return [...master, ...timed.map(({ role, r }) => ({ role, key: r.location as string, value: JSON.stringify(r) }))];
}
