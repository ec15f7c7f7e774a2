import { existsSync } from 'node:fs';
import path from 'node:path';
import type { InputType } from '../../contracts/records.ts';
import { NearcastError } from '../../errors.ts';
import { csvRows } from './csv.ts';
import { csvRecords } from './csv-records.ts';
import { readLines } from './line-reader.ts';

// The history folder of a backtest or a file-fed embedded run: one file per input type, NDJSON or CSV.

export interface HistoryFileSpec {
  readonly type: Exclude<InputType, 'location'>;
  readonly base: string;
  readonly required: boolean;
}

export const HISTORY_FILES: readonly HistoryFileSpec[] = [
  { type: 'baseline-version', base: 'baselines', required: true },
  { type: 'order-line', base: 'orders', required: true },
  { type: 'shipment', base: 'shipments', required: false },
  { type: 'day-closed', base: 'day-closes', required: false },
];

export interface FoundFile {
  readonly type: Exclude<InputType, 'location'>;
  readonly path: string;
  /** Name as written into rejected.ndjson. */
  readonly name: string;
  readonly format: 'ndjson' | 'csv';
}

/** One line (or CSV record) of a history file, not yet validated. */
export type RawLine =
  | { readonly file: string; readonly line: number; readonly text: string }
  | { readonly file: string; readonly line: number; readonly problem: string };

export function findHistoryFiles(dir: string, options: { requireShipments?: boolean } = {}): FoundFile[] {
  const found: FoundFile[] = [];
  const missing: string[] = [];
  for (const spec of HISTORY_FILES) {
    const candidates = (['ndjson', 'jsonl', 'csv'] as const).map((ext) => ({ ext, name: `${spec.base}.${ext}` }));
    const hit = candidates.find((c) => existsSync(path.join(dir, c.name)));
    if (hit) {
      found.push({ type: spec.type, path: path.join(dir, hit.name), name: hit.name, format: hit.ext === 'csv' ? 'csv' : 'ndjson' });
    } else if (spec.required || (spec.type === 'shipment' && options.requireShipments)) {
      missing.push(`${spec.base}.ndjson (or ${spec.base}.csv)`);
    }
  }
  if (!existsSync(path.join(dir, 'locations.json'))) missing.unshift('locations.json');
  if (missing.length > 0) throw new NearcastError('NEARCAST_BACKTEST_INPUT_MISSING', missing.map((m) => `${m} is not in ${dir}`));
  return found;
}

export async function* readHistoryFile(file: FoundFile): AsyncGenerator<RawLine> {
  if (file.format === 'ndjson') {
    for await (const { line, text } of readLines(file.path)) {
      if (text.trim() === '') continue;
      yield { file: file.name, line, text };
    }
    return;
  }
  for await (const rec of csvRecords(file.type, csvRows(readLines(file.path)))) {
    if ('message' in rec) yield { file: file.name, line: rec.line, problem: rec.message };
    else yield { file: file.name, line: rec.line, text: JSON.stringify(rec.value) };
  }
}
