import type { NumberedLine } from './line-reader.ts';

// RFC 4180 CSV: comma-separated, fields optionally in double quotes, a doubled quote inside quotes is one quote, and
// a quoted field may span lines. The first non-blank row is the header.

export interface CsvRow {
  /** Line number where the row starts. */
  readonly line: number;
  readonly fields: readonly string[];
}

export type CsvProblem = { readonly line: number; readonly message: string };

/** Splits one logical row; returns undefined while a quoted field is still open at the end of `text`. */
export function splitCsvRow(text: string): string[] | undefined {
  const fields: string[] = [];
  let field = '';
  let quoted = false;
  let i = 0;
  while (i < text.length) {
    const c = text[i]!;
    if (quoted) {
      if (c === '"') {
        if (text[i + 1] === '"') {
          field += '"';
          i += 2;
          continue;
        }
        quoted = false;
      } else {
        field += c;
      }
    } else if (c === '"' && field === '') {
      quoted = true;
    } else if (c === ',') {
      fields.push(field);
      field = '';
    } else {
      field += c;
    }
    i += 1;
  }
  if (quoted) return undefined;
  fields.push(field);
  return fields;
}

/** Groups numbered lines into CSV rows (joining lines inside quoted fields); blank lines are skipped. */
export async function* csvRows(lines: AsyncIterable<NumberedLine>): AsyncGenerator<CsvRow | CsvProblem> {
  let pending: { line: number; text: string } | undefined;
  for await (const { line, text } of lines) {
    if (pending === undefined && text.trim() === '') continue;
    const candidate = pending === undefined ? { line, text } : { line: pending.line, text: `${pending.text}\n${text}` };
    const fields = splitCsvRow(candidate.text);
    if (fields === undefined) {
      pending = candidate;
      continue;
    }
    pending = undefined;
    yield { line: candidate.line, fields };
  }
  if (pending !== undefined) yield { line: pending.line, message: 'a quoted field is never closed' };
}
