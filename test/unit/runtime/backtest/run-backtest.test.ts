import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import type { Manifest } from '../../../../src/contracts/manifest.ts';
import { planSchema, type Plan } from '../../../../src/contracts/plan.ts';
import { BACKTEST_FILES, runBacktest } from '../../../../src/runtime/backtest/run-backtest.ts';
import { isBusinessDay } from '../../../../src/runtime/local-day.ts';
import type { LocationModelFactory } from '../../../../src/runtime/location-model-port.ts';
import { orderBookModels } from '../fixtures/order-book-model.ts';
import { SMALL_LOCATION, writeSmallHistory } from '../fixtures/history-dir.ts';

// Backtest guarantees (issue 5) on a small hand-made history, through the runtime with a transparent test model.
// The same guarantees are checked with the real sensing and monitoring engine in core-backtest.test.ts.

const out = () => mkdtempSync(path.join(tmpdir(), 'nc-bt-out-'));
const readLines = (dir: string, file: string) => readFileSync(path.join(dir, file), 'utf8').split('\n').filter((l) => l !== '');

async function backtest(input: string, models: LocationModelFactory = orderBookModels, untilMs?: number) {
  const dir = out();
  await runBacktest({ input, out: dir, models, ...(untilMs ? { untilMs } : {}) });
  return dir;
}

describe('backtest', () => {
  it('gives byte-identical output files for the same input twice', async () => {
    const h = writeSmallHistory({ days: 21, badOrderLines: ['not json'] });
    const [a, b] = [await backtest(h.dir), await backtest(h.dir)];
    for (const f of BACKTEST_FILES) expect(readFileSync(path.join(b, f))).toEqual(readFileSync(path.join(a, f)));
    expect(readLines(a, 'plans.ndjson').length).toBeGreaterThan(0);
  });

  it('writes each bad line to rejected.ndjson with file, line number and reason, and never stops for it', async () => {
    const h = writeSmallHistory({ days: 7, badOrderLines: ['{"eventId":', JSON.stringify({ eventId: 'z', location: 'DC-NORTH' })] });
    const dir = await backtest(h.dir);
    const rejected = readLines(dir, 'rejected.ndjson').map((l) => JSON.parse(l) as { file: string; line: number; reason: string });
    // 20 good lines, then a blank line 21: the bad ones are on 22 and 23.
    expect(rejected.map((r) => [r.file, r.line])).toEqual([['orders.ndjson', 22], ['orders.ndjson', 23]]);
    expect(rejected[1]!.reason).toMatch(/orderId: is required/);
    expect(readLines(dir, 'plans.ndjson').length).toBeGreaterThan(0);
  });

  it('publishes one plan per active series for every closed business day, with all leads, matching each manifest', async () => {
    const h = writeSmallHistory({ days: 28 });
    const dir = await backtest(h.dir);
    const plans = readLines(dir, 'plans.ndjson').map((l) => JSON.parse(l) as Plan);
    const manifests = readLines(dir, 'manifests.ndjson').map((l) => JSON.parse(l) as Manifest);
    for (const p of plans) expect(planSchema.safeParse(p).success).toBe(true);
    const firsts = manifests.filter((m) => m.revision === 1).map((m) => m.planDate);
    // Every business day from the first close to the last is closed exactly once (2026-03-02 … 03-26: 19 days).
    const expected: string[] = [];
    for (let d = firsts[0]!; d <= firsts.at(-1)!; d = new Date(Date.parse(`${d}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10)) {
      if (isBusinessDay(SMALL_LOCATION as never, d)) expected.push(d);
    }
    expect(firsts).toEqual(expected);
    expect(firsts).toHaveLength(19);
    for (const m of manifests) {
      const mine = plans.filter((p) => p.planDate === m.planDate && p.revision === m.revision);
      expect(mine.map((p) => p.item)).toEqual(['COLA-1L', 'WATER-STILL-500']);
      expect(m.seriesCount).toBe(mine.length);
      for (const p of mine) expect(p.leads.map((l) => l.lead)).toEqual([0, 1, 2, 3, 4]);
    }
  });

  it('never looks ahead: deleting every record known after day D leaves every plan dated three days before D byte-identical', async () => {
    const h = writeSmallHistory({ days: 28 });
    const full = await backtest(h.dir);
    const D = '2026-03-18';
    const cut = Date.parse(`${D}T23:00:00Z`); // end of D in Berlin (CET)
    const kept = h.orders.filter((o) => Date.parse(String(o.orderedAt)) < cut);
    writeFileSync(path.join(h.dir, 'orders.ndjson'), kept.map((o) => JSON.stringify(o)).join('\n') + '\n');
    const truncated = await backtest(h.dir);
    const before = (dir: string) => readLines(dir, 'plans.ndjson').filter((l) => (JSON.parse(l) as Plan).planDate <= '2026-03-15');
    expect(before(full).length).toBeGreaterThan(10);
    expect(before(truncated)).toEqual(before(full));
  });

  it("applies a stalled feed's catch-up as late data: the day's first plan lacks it, a restatement or the next close has it", async () => {
    // A small baseline so the order book decides the adjusted number and a catch-up moves it beyond 1 %.
    const h = writeSmallHistory({ days: 10, stallOn: '2026-03-03', baseline: 1 });
    const dir = await backtest(h.dir);
    const plans = readLines(dir, 'plans.ndjson').map((l) => JSON.parse(l) as Plan);
    const cola = (date: string, revision: number) => plans.find((p) => p.item === 'COLA-1L' && p.planDate === date && p.revision === revision);
    // The stalled 14:00 order of 03-03 requested 03-05 (week of 03-02) was not known when 03-03 closed.
    const first = cola('2026-03-03', 1)!;
    // In the file it stands after the next morning's orders, so it arrives 2026-03-04 09:00 (arrival rule).
    const restated = cola('2026-03-03', 2);
    const next = cola('2026-03-04', 1)!;
    const late = h.orders.find((o) => o.item === 'COLA-1L' && o.orderedAt === '2026-03-03T14:00:00+01:00') as { quantity: number };
    expect(restated).toBeDefined();
    // By the input: the week of 03-02 as known at the restatement (after Wednesday 09:00) holds every COLA order
    // placed by then for that week; the first plan of 03-03 held the same minus the late one and Wednesday's.
    const weekBook = (untilIso: string) =>
      h.orders
        .filter((o) => o.item === 'COLA-1L' && Date.parse(String(o.orderedAt)) <= Date.parse(untilIso) && String(o.requestedDate) <= '2026-03-08')
        .reduce((t, o) => t + Number(o.quantity), 0);
    expect(restated!.leads[0]!.explanation.orderBook).toBe(weekBook('2026-03-04T09:00:00+01:00'));
    expect(first.leads[0]!.explanation.orderBook).toBe(weekBook('2026-03-03T09:00:00+01:00'));
    expect(restated!.leads[0]!.explanation.orderBook - first.leads[0]!.explanation.orderBook).toBeGreaterThanOrEqual(late.quantity);
    expect(next.leads[0]!.explanation.orderBook).toBeGreaterThanOrEqual(restated!.leads[0]!.explanation.orderBook);
  });
});
