import { mkdirSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import type { Command } from 'commander';
import { jsonSchemas } from '../contracts/json-schema.ts';

/** Returns the names of files in `dir` that differ from the generated schemas (missing, stale or extra). */
export function staleSchemaFiles(dir: string): string[] {
  const expected = jsonSchemas();
  const stale: string[] = [];
  for (const [name, doc] of expected) {
    let current: string | undefined;
    try {
      current = readFileSync(path.join(dir, name), 'utf8');
    } catch {
      current = undefined;
    }
    if (current !== `${JSON.stringify(doc, null, 2)}\n`) stale.push(name);
  }
  let present: string[] = [];
  try {
    present = readdirSync(dir).filter((f) => f.endsWith('.schema.json'));
  } catch {
    present = [];
  }
  for (const f of present) if (!expected.has(f)) stale.push(f);
  return stale.sort();
}

export function writeSchemaFiles(dir: string): string[] {
  mkdirSync(dir, { recursive: true });
  const written: string[] = [];
  for (const [name, doc] of jsonSchemas()) {
    writeFileSync(path.join(dir, name), `${JSON.stringify(doc, null, 2)}\n`);
    written.push(name);
  }
  return written;
}

export function registerSchemasCommand(program: Command): void {
  program
    .command('schemas')
    .description('write the JSON Schema (2020-12) of every record type into schemas/, or check they are current')
    .option('--dir <dir>', 'target folder', 'schemas')
    .option('--check', 'do not write; exit 1 if any file is missing or stale')
    .action((opts: { dir: string; check?: boolean }) => {
      if (opts.check) {
        const stale = staleSchemaFiles(opts.dir);
        if (stale.length > 0) {
          console.error(`stale JSON Schema files in ${opts.dir} (run npm run schemas): ${stale.join(', ')}`);
          process.exitCode = 1;
        } else {
          console.log(`schemas in ${opts.dir} are current`);
        }
        return;
      }
      for (const name of writeSchemaFiles(opts.dir)) console.log(`wrote ${path.join(opts.dir, name)}`);
    });
}
