import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { staleSchemaFiles, writeSchemaFiles } from '../../../src/cli/schemas-command.ts';
import { writeSmallHistory } from '../runtime/fixtures/history-dir.ts';

const CLI = path.resolve('scripts/nearcast.mjs');
const run = (...args: string[]) => spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8', env: { ...process.env, NEARCAST_LOG_LEVEL: 'silent' } });

describe('the nearcast command', () => {
  it('lists its subcommands in --help', () => {
    const r = run('--help');
    expect(r.status).toBe(0);
    for (const c of ['serve', 'demo', 'backtest', 'schemas', 'dead-letter', 'broker']) expect(r.stdout).toContain(c);
  });

  it('backtest writes the five files and reports what it did', () => {
    const h = writeSmallHistory({ days: 10 });
    const out = mkdtempSync(path.join(tmpdir(), 'nc-cli-out-'));
    const r = run('backtest', '--input', h.dir, '--out', out, '--quiet');
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/^backtest: \d+ closes, \d+ plans/);
    for (const f of ['plans.ndjson', 'manifests.ndjson', 'alerts.ndjson', 'rejected.ndjson', 'accuracy.json']) expect(existsSync(path.join(out, f))).toBe(true);
    expect(readFileSync(path.join(out, 'plans.ndjson'), 'utf8').split('\n').length).toBeGreaterThan(5);
  });

  it('backtest names every missing history file and exits 1 without a stack trace', () => {
    const r = run('backtest', '--input', mkdtempSync(path.join(tmpdir(), 'nc-empty-')), '--out', mkdtempSync(path.join(tmpdir(), 'nc-o-')));
    expect(r.status).toBe(1);
    expect(r.stderr).toContain('NEARCAST_BACKTEST_INPUT_MISSING');
    expect(r.stderr).toContain('baselines.ndjson (or baselines.csv)');
    expect(r.stderr).toContain('orders.ndjson (or orders.csv)');
    expect(r.stderr).not.toMatch(/\n\s+at /);
  });
});

describe('schemas --check', () => {
  it('passes on freshly written schemas and lists a stale or extra file otherwise', () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'nc-schemas-'));
    writeSchemaFiles(dir);
    expect(staleSchemaFiles(dir)).toEqual([]);
    writeFileSync(path.join(dir, 'plan.v1.schema.json'), '{}\n');
    writeFileSync(path.join(dir, 'old.v0.schema.json'), '{}\n');
    expect(staleSchemaFiles(dir)).toEqual(['old.v0.schema.json', 'plan.v1.schema.json']);
    const r = run('schemas', '--check', '--dir', dir);
    expect(r.status).toBe(1);
    expect(r.stderr).toContain('plan.v1.schema.json');
  });
});
