import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { NdjsonFile } from '../../../../src/runtime/backtest/output-files.ts';

describe('NdjsonFile', () => {
  const dirs: string[] = [];
  afterEach(() => dirs.splice(0).forEach((d) => rmSync(d, { recursive: true, force: true })));
  const file = () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'nc-ndjson-'));
    dirs.push(dir);
    return path.join(dir, 'out.ndjson');
  };

  it('writes every line exactly, in order, one line feed after each', () => {
    const f = file();
    const out = new NdjsonFile(f);
    // Multi-byte characters (2, 3 and 4 bytes in UTF-8), lines that fill the 1 MiB buffer many times over, and one
    // line larger than the buffer on its own.
    const lines = [
      '{"item":"ÁGUA-TÓNICA-200","note":"€ 5"}',
      '{"emoji":"🍋"}',
      ...Array.from({ length: 3000 }, (_, i) => JSON.stringify({ i, pad: 'x'.repeat(i % 997) })),
      JSON.stringify({ big: 'é'.repeat(700_000) }),
      '{"last":true}',
    ];
    for (const l of lines) out.write(l);
    out.close();
    expect(readFileSync(f, 'utf8')).toBe(`${lines.join('\n')}\n`);
  });

  it('leaves an empty file when nothing was written', () => {
    const f = file();
    new NdjsonFile(f).close();
    expect(readFileSync(f, 'utf8')).toBe('');
  });
});
