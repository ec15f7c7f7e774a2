import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import type { DemoHistory } from './generate-history.ts';

const ndjson = (rows: readonly unknown[]) => rows.map((r) => `${JSON.stringify(r)}\n`).join('');

/** Writes a history folder in the layout `nearcast backtest --input` reads. */
export function writeHistory(dir: string, history: DemoHistory): string[] {
  mkdirSync(dir, { recursive: true });
  const files: [string, string][] = [
    ['locations.json', `${JSON.stringify(history.locations, null, 2)}\n`],
    ['baselines.ndjson', ndjson(history.baselines)],
    ['orders.ndjson', ndjson(history.orders)],
    ['shipments.ndjson', ndjson(history.shipments)],
    ['day-closes.ndjson', ndjson(history.dayCloses)],
  ];
  for (const [name, text] of files) writeFileSync(path.join(dir, name), text);
  return files.map(([name]) => path.join(dir, name));
}
