import { describe, expect, it } from 'vitest';
import { csvRows, splitCsvRow } from '../../../../src/runtime/history/csv.ts';
import { csvRecords } from '../../../../src/runtime/history/csv-records.ts';

async function* lines(...texts: string[]) {
  let line = 0;
  for (const text of texts) yield { line: ++line, text };
}

async function collect<T>(it: AsyncIterable<T>): Promise<T[]> {
  const out: T[] = [];
  for await (const x of it) out.push(x);
  return out;
}

describe('CSV rows (RFC 4180)', () => {
  it('splits on commas, keeps commas inside quotes and reads a doubled quote as one', () => {
    expect(splitCsvRow('a,"b,c","say ""hi""",')).toEqual(['a', 'b,c', 'say "hi"', '']);
  });

  it('joins a quoted field that spans lines and reports where the row started', async () => {
    const rows = await collect(csvRows(lines('h1,h2', '"first', 'second",x', '', 'y,z')));
    expect(rows).toEqual([
      { line: 1, fields: ['h1', 'h2'] },
      { line: 2, fields: ['first\nsecond', 'x'] },
      { line: 5, fields: ['y', 'z'] },
    ]);
  });

  it('reports a quote that is never closed instead of swallowing the rest of the file', async () => {
    const rows = await collect(csvRows(lines('h', '"open')));
    expect(rows.at(-1)).toEqual({ line: 2, message: 'a quoted field is never closed' });
  });
});

describe('CSV records', () => {
  it('turns numeric columns into numbers, leaves empty cells out and keeps a non-number as text for validation to name', async () => {
    const rows = csvRows(lines('eventId,revision,quantity,changedAt,customer', 'e1,2,12.5,,ACME', 'e2,two,3,,'));
    const recs = await collect(csvRecords('order-line', rows));
    expect(recs).toEqual([
      { line: 2, value: { eventId: 'e1', revision: 2, quantity: 12.5, customer: 'ACME' } },
      { line: 3, value: { eventId: 'e2', revision: 'two', quantity: 3 } },
    ]);
  });

  it('groups consecutive baseline rows of one eventId into one version with a week per row', async () => {
    const rows = csvRows(lines('eventId,location,item,version,publishedAt,weekStart,quantity', 'b1,DC,X,1,t,2026-03-02,10', 'b1,DC,X,1,t,2026-03-09,11', 'b2,DC,Y,1,t,2026-03-02,5'));
    const recs = await collect(csvRecords('baseline-version', rows));
    expect(recs).toEqual([
      { line: 2, value: { eventId: 'b1', location: 'DC', item: 'X', version: 1, publishedAt: 't', weeks: [{ weekStart: '2026-03-02', quantity: 10 }, { weekStart: '2026-03-09', quantity: 11 }] } },
      { line: 4, value: { eventId: 'b2', location: 'DC', item: 'Y', version: 1, publishedAt: 't', weeks: [{ weekStart: '2026-03-02', quantity: 5 }] } },
    ]);
  });
});
