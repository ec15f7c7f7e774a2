import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { NearcastError } from '../../errors.ts';
import type { RawLine } from './history-files.ts';

// locations.json holds the master data: a JSON array of location records, one object, or one record per line.
// Each element keeps the line it starts on, so a rejected one is reported where an editor shows it.

export const LOCATIONS_FILE = 'locations.json';

/** Start offsets of the top-level elements of a JSON array text (strings and nesting respected). */
export function arrayElementStarts(text: string): { start: number; end: number }[] {
  const out: { start: number; end: number }[] = [];
  let depth = 0;
  let inString = false;
  let start = -1;
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    if (inString) {
      if (c === '\\') i++;
      else if (c === '"') inString = false;
      continue;
    }
    if (c === '"') {
      inString = true;
      if (depth === 1 && start < 0) start = i;
    } else if (c === '[' || c === '{') {
      if (depth === 1 && start < 0) start = i;
      depth++;
    } else if (c === ']' || c === '}') {
      depth--;
      if (depth === 0 && start >= 0) out.push({ start, end: i });
    } else if (c === ',' && depth === 1) {
      if (start >= 0) out.push({ start, end: i });
      start = -1;
    } else if (depth === 1 && start < 0 && !/\s/.test(c)) {
      start = i;
    }
  }
  return out;
}

function lineAt(text: string, offset: number): number {
  let n = 1;
  for (let i = 0; i < offset; i++) if (text.charCodeAt(i) === 10) n++;
  return n;
}

export function readLocationsFile(dir: string): RawLine[] {
  const file = path.join(dir, LOCATIONS_FILE);
  if (!existsSync(file)) throw new NearcastError('NEARCAST_BACKTEST_INPUT_MISSING', [`${LOCATIONS_FILE} is not in ${dir}`]);
  const text = readFileSync(file, 'utf8').replace(/^\uFEFF/, '');
  const trimmed = text.trimStart();
  if (trimmed.startsWith('[')) {
    try {
      JSON.parse(text);
    } catch {
      return [{ file: LOCATIONS_FILE, line: 1, problem: 'is not valid JSON (expected an array of location records)' }];
    }
    return arrayElementStarts(text).map(({ start, end }) => ({ file: LOCATIONS_FILE, line: lineAt(text, start), text: text.slice(start, end).trim() }));
  }
  try {
    const one = JSON.parse(text) as unknown;
    return [{ file: LOCATIONS_FILE, line: lineAt(text, text.length - trimmed.length), text: JSON.stringify(one) }];
  } catch {
    // One record per line.
    return text
      .split(/\r?\n/)
      .map((t, i) => ({ file: LOCATIONS_FILE, line: i + 1, text: t }))
      .filter((l) => l.text.trim() !== '');
  }
}
