import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Alert } from '../contracts/alert.ts';
import type { Plan } from '../contracts/plan.ts';
import { RecordValidator } from '../contracts/validate.ts';
import type { LocationModelFactory } from '../runtime/location-model-port.ts';
import { EmbeddedRuntime } from '../transport/embedded/embedded-runtime.ts';
import { EmbeddedStore } from '../transport/embedded/embedded-store.ts';
import { feedHistory } from '../transport/embedded/history-feed.ts';
import { CENTRES, ITEMS } from './catalogue.ts';
import { generateHistory } from './generate-history.ts';
import { DEMO_SCENARIO, type Scenario } from './scenario.ts';
import { summariseCentre } from './summary.ts';
import { writeHistory } from './write-history.ts';

// `nearcast demo`: generate the scenario, run it through the embedded default (a SQLite file), print the summary.

export interface DemoOptions {
  readonly models: LocationModelFactory;
  /** Keep the generated history folder and database here instead of a temporary folder. */
  readonly keepDir?: string;
  readonly scenario?: Scenario;
  readonly progress?: (line: string) => void;
}

export interface DemoResult {
  readonly text: string;
  readonly dir: string;
  readonly database: string;
  readonly closes: number;
}

function scenarioLines(s: Scenario): string[] {
  return [
    `What happened in the invented history (${s.weeks} weeks from ${s.start}, ${CENTRES.length} centres, ${ITEMS.length} items):`,
    `  - a heat wave at ${s.heatWave.location} from ${s.heatWave.from}, lifting weather-sensitive drinks;`,
    `  - ${s.stockUp.customer} at ${s.stockUp.location} stocking up on ${s.stockUp.items.join(', ')} for the week of ${s.stockUp.requestedFrom}, before a price change on ${s.stockUp.priceChangeOn};`,
    `  - the ${s.feedStall.location} order feed stalling on ${s.feedStall.from.slice(0, 10)} and catching up the next day (late data);`,
    '  - public holidays at every centre (e.g. Ascension Day 2026-05-14 at DC-NORTH).',
  ];
}

export async function runDemo(options: DemoOptions): Promise<DemoResult> {
  const scenario = options.scenario ?? DEMO_SCENARIO;
  const dir = options.keepDir ?? mkdtempSync(path.join(tmpdir(), 'nearcast-demo-'));
  const historyDir = path.join(dir, 'history');
  const database = path.join(dir, 'nearcast-demo.sqlite');
  rmSync(database, { force: true });
  rmSync(`${database}-wal`, { force: true });
  rmSync(`${database}-shm`, { force: true });
  options.progress?.(`demo: generating the scenario into ${historyDir}`);
  writeHistory(historyDir, generateHistory(scenario));
  const store = new EmbeddedStore(database);
  try {
    let closes = 0;
    // A replay needs no low latency: large batches mean fewer state snapshots, which dominate the cost.
    const runtime = new EmbeddedRuntime({ store, models: options.models, batchSize: 10_000, onBatch: (_p, r) => (closes += r.closes.length) });
    options.progress?.(`demo: running it through the embedded runtime (${database})`);
    await feedHistory(runtime, historyDir, { validator: new RecordValidator(), batchSize: 10_000, untilMs: Date.parse(scenario.cutAt), ...(options.progress ? { progress: options.progress } : {}) });
    const plans = store.latest('plans').filter((r) => !r.key.endsWith('|#manifest')).map((r) => JSON.parse(r.data) as Plan);
    const alerts = store.latest('alerts').filter((r) => r.type === 'io.nearcast.alert.v1').map((r) => JSON.parse(r.data) as Alert);
    const text = [
      'nearcast demo — an invented beverage distributor',
      'The adjusted plan is advisory: every number is bounded by guardrails and explained; people review it before acting.',
      '',
      ...scenarioLines(scenario),
      '',
      ...CENTRES.map((c) =>
        summariseCentre({
          location: c.master.location,
          timeZone: c.master.timeZone,
          plans: plans.filter((p) => p.location === c.master.location),
          alerts: alerts.filter((a) => a.location === c.master.location),
        }),
      ).flatMap((block) => [block, '']),
      options.keepDir ? `${closes} day closes published; history and database kept in ${dir}` : `${closes} day closes published (run with --keep DIR to keep the history and the SQLite file)`,
    ].join('\n');
    return { text, dir, database, closes };
  } finally {
    store.close();
    if (!options.keepDir) rmSync(dir, { recursive: true, force: true });
  }
}
