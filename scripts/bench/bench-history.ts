// A scaled-up history for the runtime benchmarks: the demo's generator over many synthetic items and centres,
// with volumes chosen so a series averages about three records a business day (order lines, revisions, shipments),
// as issue 5's benchmark describes.
import { CENTRES, ITEMS, type DemoCentre, type DemoItem } from '../../src/demo/catalogue.ts';
import { generateHistory, type DemoHistory } from '../../src/demo/generate-history.ts';
import { DEMO_SCENARIO, type Scenario } from '../../src/demo/scenario.ts';
import { addDays } from '../../src/runtime/local-day.ts';

export interface BenchShape {
  readonly centres: number;
  readonly itemsPerCentre: number;
  readonly weeks: number;
}

export function benchScenario(weeks: number): Scenario {
  const end = addDays(DEMO_SCENARIO.start, 7 * weeks);
  return { ...DEMO_SCENARIO, weeks, cutAt: `${end}T04:30:00Z`, baselineWeeks: [0, 4, 8, 12].filter((w) => w < weeks) };
}

export function benchCatalogue(shape: BenchShape): { centres: DemoCentre[]; items: DemoItem[] } {
  const centres = Array.from({ length: shape.centres }, (_, i) => {
    const base = CENTRES[i % CENTRES.length]!;
    return {
      ...base,
      master: { ...base.master, location: `DC-B${String(i + 1).padStart(2, '0')}` as DemoCentre['master']['location'] },
      customers: base.customers.slice(0, 3),
    };
  });
  const items = Array.from({ length: shape.itemsPerCentre }, (_, i) => {
    const base = ITEMS[i % ITEMS.length]!;
    // Small weekly volumes: most customer-days order nothing or one line.
    return { ...base, item: `${base.item.slice(0, 40)}-${i}`, weekly: 4 + (base.weekly % 40) };
  });
  return { centres, items };
}

export function benchHistory(shape: BenchShape): { history: DemoHistory; scenario: Scenario } {
  const scenario = benchScenario(shape.weeks);
  return { history: generateHistory(scenario, benchCatalogue(shape)), scenario };
}
