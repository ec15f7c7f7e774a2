import { describe, expect, it } from 'vitest';
import { RecordValidator } from '../../../src/contracts/validate.ts';
import { CENTRES, ITEMS } from '../../../src/demo/catalogue.ts';
import { generateHistory } from '../../../src/demo/generate-history.ts';
import { DEMO_SCENARIO } from '../../../src/demo/scenario.ts';

const centres = CENTRES;
const items = ITEMS.filter((i) => ['COLA-1L', 'COLA-330', 'WATER-STILL-500'].includes(i.item));
const h = generateHistory(DEMO_SCENARIO, { centres, items });
const known = (r: Record<string, unknown>) => Date.parse(String(r.changedAt ?? r.orderedAt ?? r.shippedAt));

describe('the demo history', () => {
  it('is the same for the same seed and every record passes its contract', () => {
    expect(JSON.stringify(generateHistory(DEMO_SCENARIO, { centres, items }))).toBe(JSON.stringify(h));
    const v = new RecordValidator();
    for (const r of h.orders) expect(v.check('order-line', r).ok).toBe(true);
    for (const r of h.shipments) expect(v.check('shipment', r).ok).toBe(true);
    for (const r of h.baselines) expect(v.check('baseline-version', r).ok).toBe(true);
    for (const r of h.locations) expect(v.check('location', r).ok).toBe(true);
  });

  it('lists the stalled feed where it arrived: after the next morning, out of knowledge order', () => {
    const stall = DEMO_SCENARIO.feedStall;
    const from = Date.parse(stall.from);
    const idx = h.orders.findIndex((o) => o.location === stall.location && known(o) >= from && known(o) < Date.parse(stall.catchUpAt));
    expect(idx).toBeGreaterThan(0);
    // Something known later than the stalled record stands before it in the file.
    expect(h.orders.slice(0, idx).some((o) => known(o) > known(h.orders[idx]!))).toBe(true);
  });

  it('has no demand requested on a closed holiday, and the stock-up customer orders far more in its week', () => {
    expect(h.orders.filter((o) => o.location === 'DC-NORTH' && o.requestedDate === '2026-05-14')).toEqual([]);
    const su = DEMO_SCENARIO.stockUp;
    const week = (from: string, to: string) =>
      h.orders.filter((o) => o.location === su.location && o.customer === su.customer && o.item === 'COLA-1L' && o.revision === 1 && String(o.requestedDate) >= from && String(o.requestedDate) <= to).reduce((t, o) => t + Number(o.quantity), 0);
    expect(week(su.requestedFrom, su.requestedTo)).toBeGreaterThan(2 * week('2026-07-06', '2026-07-10'));
  });
});
