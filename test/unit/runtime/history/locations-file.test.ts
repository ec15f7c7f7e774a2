import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { readLocationsFile } from '../../../../src/runtime/history/locations-file.ts';

function dirWith(text: string): string {
  const dir = mkdtempSync(path.join(tmpdir(), 'nc-loc-'));
  writeFileSync(path.join(dir, 'locations.json'), text);
  return dir;
}

describe('locations.json', () => {
  it('reads a JSON array and reports each element at the line it starts on', () => {
    const dir = dirWith('[\r\n  {"location": "A", "timeZone": "Europe/Berlin",\r\n   "holidays": [{"date": "2026-05-01", "kind": "closed"}]},\r\n  {"location": "B, \\"quoted\\"", "timeZone": "UTC"}\r\n]\r\n');
    const lines = readLocationsFile(dir);
    expect(lines.map((l) => l.line)).toEqual([2, 4]);
    expect(lines.map((l) => ('text' in l ? JSON.parse(l.text).location : null))).toEqual(['A', 'B, "quoted"']);
  });

  it('also reads one record per line', () => {
    const lines = readLocationsFile(dirWith('{"location":"A","timeZone":"UTC"}\n\n{"location":"B","timeZone":"UTC"}\n'));
    expect(lines.map((l) => l.line)).toEqual([1, 3]);
  });

  it('says the array is not valid JSON rather than guessing', () => {
    expect(readLocationsFile(dirWith('[{"location": "A",]'))).toEqual([{ file: 'locations.json', line: 1, problem: 'is not valid JSON (expected an array of location records)' }]);
  });
});
