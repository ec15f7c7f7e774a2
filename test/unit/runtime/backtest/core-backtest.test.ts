import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import type { Alert } from '../../../../src/contracts/alert.ts';
import { alertSchema } from '../../../../src/contracts/alert.ts';
import type { Manifest } from '../../../../src/contracts/manifest.ts';
import { planSchema, type Plan } from '../../../../src/contracts/plan.ts';
import { CENTRES, ITEMS } from '../../../../src/demo/catalogue.ts';
import { generateHistory, type DemoHistory } from '../../../../src/demo/generate-history.ts';
import { DEMO_SCENARIO } from '../../../../src/demo/scenario.ts';
import { writeHistory } from '../../../../src/demo/write-history.ts';
import { BACKTEST_FILES, runBacktest } from '../../../../src/runtime/backtest/run-backtest.ts';
import { createCoreModels } from '../../../../src/runtime/core-location-model.ts';
import { isBusinessDay } from '../../../../src/runtime/local-day.ts';

// The backtest guarantees of issue 5 with the real sensing and monitoring engine, on a slice of the demo scenario:
// DC-NORTH (a customer stocking up; sends day-closed records) and DC-COAST (its feed stalls on 2026-07-21).

const centres = CENTRES.filter((c) => c.master.location === 'DC-NORTH' || c.master.location === 'DC-COAST');
const items = ITEMS.filter((i) => ['COLA-1L', 'COLA-330', 'WATER-STILL-500', 'SYRUP-MINT-500'].includes(i.item));
const until = Date.parse(DEMO_SCENARIO.cutAt);
const models = createCoreModels({ demandBasis: 'orders' });
const tmp = (p: string) => mkdtempSync(path.join(tmpdir(), p));
const lines = (dir: string, f: string) => readFileSync(path.join(dir, f), 'utf8').split('\n').filter((l) => l !== '');

async function backtest(history: DemoHistory): Promise<string> {
  const input = tmp('nc-core-in-');
  writeHistory(input, history);
  const out = tmp('nc-core-out-');
  await runBacktest({ input, out, models, untilMs: until });
  return out;
}

const full = generateHistory(DEMO_SCENARIO, { centres, items });
let fullOut = '';
beforeAll(async () => {
  fullOut = await backtest(full);
}, 120_000);

describe('backtest with the sensing and monitoring engine', () => {
  it('writes valid plan and alert records', () => {
    const plans = lines(fullOut, 'plans.ndjson').map((l) => JSON.parse(l) as unknown);
    const alerts = lines(fullOut, 'alerts.ndjson').map((l) => JSON.parse(l) as { schemaVersion: string });
    expect(plans.length).toBeGreaterThan(500);
    for (const p of plans) expect(planSchema.safeParse(p).success).toBe(true);
    for (const a of alerts.filter((x) => x.schemaVersion === 'nearcast.alert.v1')) expect(alertSchema.safeParse(a).success).toBe(true);
  });

  it('gives byte-identical files for the same input twice', async () => {
    const again = await backtest(full);
    for (const f of BACKTEST_FILES) expect(readFileSync(path.join(again, f)).equals(readFileSync(path.join(fullOut, f)))).toBe(true);
  }, 120_000);

  it('publishes one plan per active series for every closed business day, with all leads', () => {
    const plans = lines(fullOut, 'plans.ndjson').map((l) => JSON.parse(l) as Plan);
    const manifests = lines(fullOut, 'manifests.ndjson').map((l) => JSON.parse(l) as Manifest);
    for (const c of centres) {
      const mine = manifests.filter((m) => m.location === c.master.location && m.revision === 1).map((m) => m.planDate);
      const expected: string[] = [];
      for (let d = mine[0]!; d <= mine.at(-1)!; d = new Date(Date.parse(`${d}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10)) {
        if (isBusinessDay(c.master, d)) expected.push(d);
      }
      expect(mine).toEqual(expected);
    }
    for (const m of manifests) {
      const closed = plans.filter((p) => p.location === m.location && p.planDate === m.planDate && p.revision === m.revision);
      expect(closed).toHaveLength(m.seriesCount);
      expect(new Set(closed.map((p) => p.item)).size).toBe(closed.length);
      for (const p of closed) expect(p.leads.map((l) => l.lead)).toEqual([0, 1, 2, 3, 4]);
    }
  });

  it('never looks ahead: deleting every record known after day D leaves every plan dated three days before D byte-identical', async () => {
    const D = '2026-06-17';
    const cut = Date.parse(`${D}T22:00:00Z`); // end of D in Berlin and Lisbon summer time (UTC+2 / UTC+1) or earlier
    const known = (r: Record<string, unknown>) => Date.parse(String(r.changedAt ?? r.orderedAt ?? r.shippedAt ?? r.publishedAt));
    const truncated: DemoHistory = {
      ...full,
      orders: full.orders.filter((r) => known(r) < cut),
      shipments: full.shipments.filter((r) => known(r) < cut),
      baselines: full.baselines.filter((r) => known(r) < cut),
      dayCloses: full.dayCloses.filter((r) => String(r.date) < D),
    };
    const out = await backtest(truncated);
    const upTo = (dir: string) => lines(dir, 'plans.ndjson').filter((l) => (JSON.parse(l) as Plan).planDate <= '2026-06-14');
    // alerts.ndjson also carries the weekly re-plan entries (dated by weekOf, not changedOn).
    const alertsUpTo = (dir: string) =>
      lines(dir, 'alerts.ndjson').filter((l) => {
        const r = JSON.parse(l) as Alert & { weekOf?: string };
        return (r.changedOn ?? r.weekOf ?? '9999') <= '2026-06-14';
      });
    expect(upTo(fullOut).length).toBeGreaterThan(300);
    expect(upTo(out)).toEqual(upTo(fullOut));
    expect(alertsUpTo(out)).toEqual(alertsUpTo(fullOut));
  }, 120_000);

  it("treats the stalled feed's catch-up as late data: a feed alert for the day, no spike when it arrives", () => {
    const alerts = lines(fullOut, 'alerts.ndjson').map((l) => JSON.parse(l) as Alert).filter((a) => a.location === 'DC-COAST');
    expect(alerts.some((a) => a.rule === 'feed-stalled' && a.episodeStart === '2026-07-21' && a.change === 'opened')).toBe(true);
    expect(alerts.filter((a) => a.rule === 'spike' && (a.changedOn === '2026-07-22' || a.changedOn === '2026-07-23'))).toEqual([]);
    // The day of the stall was still closed and published (by its deadline), before the catch-up arrived.
    const manifests = lines(fullOut, 'manifests.ndjson').map((l) => JSON.parse(l) as Manifest);
    expect(manifests.some((m) => m.location === 'DC-COAST' && m.planDate === '2026-07-21')).toBe(true);
  });
});
