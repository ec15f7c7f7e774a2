#!/usr/bin/env node
// `npm run bench`: runs every benchmark under scripts/bench/ in turn and lets each print its figures.
// Pass names to run a subset: `npm run bench -- monitoring backtest`. Long campaigns stay opt-in (see DEVELOPERS.md).
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));
const ALL = ['monitoring', 'sensing', 'backtest', 'close', 'kafka-ingest', 'restore'];
// Named only (over an hour at full size): `npm run bench -- backfill`. Node flags a benchmark needs at full size.
const NODE_FLAGS = { backfill: ['--max-old-space-size=16000'] };
const chosen = process.argv.slice(2).length > 0 ? process.argv.slice(2) : ALL;
let failed = 0;
for (const name of chosen) {
  const file = path.join(here, `${name}.ts`);
  if (!existsSync(file)) {
    console.log(`\n== ${name}: no such benchmark (scripts/bench/${name}.ts)`);
    continue;
  }
  console.log(`\n== ${name} (scripts/bench/${name}.ts)`);
  const started = process.hrtime.bigint();
  const r = spawnSync(process.execPath, [...(NODE_FLAGS[name] ?? []), '--import', 'tsx', file], { stdio: 'inherit' });
  const seconds = Number(process.hrtime.bigint() - started) / 1e9;
  console.log(`== ${name}: exit ${r.status} after ${seconds.toFixed(1)} s`);
  if (r.status !== 0) failed += 1;
}
process.exitCode = failed > 0 ? 1 : 0;
