import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

// The pure core does no I/O and reads no clock, so a replay or a backtest computes exactly what the live run did.
const CORE = ['contracts', 'calendar', 'stats', 'sensing', 'monitoring', 'accuracy'];
const IO_MODULES = /from '(node:)?(fs|net|http|https|http2|dgram|dns|child_process|worker_threads|tls)(\/promises)?'|from '(kafkajs|better-sqlite3|fastify|pino|undici)'/;
const CLOCK = /\bDate\.now\(|new Date\(\s*\)|Math\.random\(|performance\.now\(|process\.hrtime|\bprocess\.env\b/;

function filesUnder(dir: string): string[] {
  let out: string[] = [];
  let entries: string[] = [];
  try {
    entries = readdirSync(dir);
  } catch {
    return out;
  }
  for (const e of entries) {
    const p = path.join(dir, e);
    if (statSync(p).isDirectory()) out = out.concat(filesUnder(p));
    else if (p.endsWith('.ts')) out.push(p);
  }
  return out;
}

describe('the pure core', () => {
  const files = CORE.flatMap((d) => filesUnder(path.join('src', d)));

  it('exists', () => {
    expect(files.length).toBeGreaterThan(5);
  });

  it.each(files)('%s imports no I/O module and no shell code', (file) => {
    const text = readFileSync(file, 'utf8');
    expect(text).not.toMatch(IO_MODULES);
    expect(text).not.toMatch(/from '\.\.\/(runtime|transport|api|cli|delivery|config)\//);
  });

  it.each(files)('%s reads no clock, no environment and no unseeded randomness', (file) => {
    const code = readFileSync(file, 'utf8').replace(/\/\/.*$/gm, '').replace(/\/\*[\s\S]*?\*\//g, '');
    expect(code).not.toMatch(CLOCK);
  });
});

describe('the source tree', () => {
  it('has no stray console output outside the CLI (logging goes through pino with redaction)', () => {
    const offenders = filesUnder('src')
      .filter((f) => !f.startsWith(path.join('src', 'cli')))
      .filter((f) => /\bconsole\.(log|error|warn|info|debug)\(/.test(readFileSync(f, 'utf8')));
    expect(offenders).toEqual([]);
  });
});
