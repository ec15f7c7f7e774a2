import { createRng, sampleNormal } from '../stats/random.ts';
import { addDays, isBusinessDay, localTimeMs } from '../runtime/local-day.ts';
import { CENTRES, centreMaster, ITEMS, type DemoCentre, type DemoItem } from './catalogue.ts';
import { expectedDemand } from './demand-model.ts';
import { generateSeries, seriesSeed, stamp, type Timed } from './generate-orders.ts';
import type { Scenario } from './scenario.ts';

// The whole demo history, as the files a history folder holds, each in arrival order. The stalled feed's records
// are listed where they arrived — after the next morning's records — which is what makes them late data.

export interface DemoHistory {
  readonly locations: readonly Record<string, unknown>[];
  readonly baselines: readonly Record<string, unknown>[];
  readonly orders: readonly Record<string, unknown>[];
  readonly shipments: readonly Record<string, unknown>[];
  readonly dayCloses: readonly Record<string, unknown>[];
}

/** Level of a series: the item's typical week at a mid-sized centre, scaled, with a per-series spread. */
function seriesLevel(scenario: Scenario, centre: DemoCentre, item: DemoItem): number {
  const rng = createRng(seriesSeed(scenario.seed ^ 0x5eed, centre.master.location, item.item));
  return item.weekly * centre.scale * Math.exp(0.25 * sampleNormal(rng));
}

/** The planning cycle's versions: they know levels, season and holidays, not the heat wave or the stock-up. */
function baselinesOf(scenario: Scenario, centre: DemoCentre, item: DemoItem, level: number): Timed<Record<string, unknown>>[] {
  const rng = createRng(seriesSeed(scenario.seed ^ 0xba5e, centre.master.location, item.item));
  const bias = Math.exp(0.08 * sampleNormal(rng));
  const calm = { ...scenario, heatWave: { ...scenario.heatWave, lift: 0 } };
  return scenario.baselineWeeks.map((k, v) => {
    const first = addDays(scenario.start, 7 * k);
    const publishedMs = localTimeMs(addDays(first, -3), '16:00', centre.master.timeZone);
    const weeks = Array.from({ length: scenario.baselineHorizonWeeks }, (_, w) => {
      const weekStart = addDays(first, 7 * w);
      let expected = 0;
      for (let d = 0; d < 7; d++) expected += expectedDemand(calm, centre, item, level, addDays(weekStart, d));
      return { weekStart, quantity: Math.max(0, Math.round(expected * bias * (1 + 0.06 * sampleNormal(rng)))) };
    });
    return {
      knownMs: publishedMs,
      record: { eventId: `B-${centre.master.location}-${item.item}-v${v + 1}`, location: centre.master.location, item: item.item, version: v + 1, publishedAt: stamp(publishedMs, centre.master.timeZone), weeks },
    };
  });
}

function inArrivalOrder<T>(items: Timed<T>[], arrival: (t: Timed<T>) => number): T[] {
  return items
    .map((t, i) => ({ t, i, a: arrival(t) }))
    .sort((x, y) => x.a - y.a || x.t.knownMs - y.t.knownMs || x.i - y.i)
    .map((x) => x.t.record);
}

export interface HistoryOptions {
  /** A subset of the catalogue (tests and benchmarks use fewer or more series). */
  readonly centres?: readonly DemoCentre[];
  readonly items?: readonly DemoItem[];
}

export function generateHistory(scenario: Scenario, options: HistoryOptions = {}): DemoHistory {
  const centres = options.centres ?? CENTRES;
  const items = options.items ?? ITEMS;
  const orders: Timed<Record<string, unknown>>[] = [];
  const shipments: Timed<Record<string, unknown>>[] = [];
  const baselines: Timed<Record<string, unknown>>[] = [];
  for (const centre of centres) {
    for (const [index, item] of items.entries()) {
      const level = seriesLevel(scenario, centre, item);
      const s = generateSeries(scenario, centre, item, level, { centre: centre.master.location.slice(3, 4), item: index + 1 });
      orders.push(...s.orders);
      shipments.push(...s.shipments);
      baselines.push(...baselinesOf(scenario, centre, item, level));
    }
  }
  const stall = scenario.feedStall;
  const [from, to] = [Date.parse(stall.from), Date.parse(stall.catchUpAt)];
  const arrival = (t: Timed<Record<string, unknown>>) => (t.record.location === stall.location && t.knownMs >= from && t.knownMs < to ? to : t.knownMs);

  const dayCloses: Record<string, unknown>[] = [];
  const cutDate = scenario.cutAt.slice(0, 10);
  // Orders for the first weeks were placed before the history starts; the source closes those days too.
  const firstOrderDate = new Date(orders.reduce((m, o) => Math.min(m, o.knownMs), Date.parse(scenario.cutAt))).toISOString().slice(0, 10);
  for (const centre of centres.filter((c) => c.sendsDayClosed)) {
    for (let d = addDays(firstOrderDate, -1); d < cutDate; d = addDays(d, 1)) {
      if (isBusinessDay(centre.master, d)) dayCloses.push({ eventId: `DC-${centre.master.location}-${d}`, location: centre.master.location, date: d });
    }
  }
  return {
    locations: centres.map((c) => centreMaster(c, items)),
    baselines: inArrivalOrder(baselines, (t) => t.knownMs),
    orders: inArrivalOrder(orders, arrival),
    shipments: inArrivalOrder(shipments, arrival),
    dayCloses,
  };
}
