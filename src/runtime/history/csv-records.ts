import type { InputType } from '../../contracts/records.ts';
import type { CsvProblem, CsvRow } from './csv.ts';

// CSV carries the same fields as the JSON records. Numeric columns become numbers (a cell that is not a number stays
// text, so validation names the field); an empty cell is an absent field. A baseline version, whose `weeks` is a
// list, is either one row with a JSON `weeks` cell or consecutive rows sharing an eventId, one week per row
// (`weekStart`, `quantity`).

const NUMERIC: Partial<Record<InputType, readonly string[]>> = {
  'order-line': ['revision', 'quantity'],
  shipment: ['quantity'],
  'baseline-version': ['version', 'quantity'],
};

const NUMBER = /^-?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export interface CsvRecord {
  readonly line: number;
  readonly value: Record<string, unknown>;
}

function toObject(type: InputType, header: readonly string[], fields: readonly string[]): Record<string, unknown> {
  const numeric = NUMERIC[type] ?? [];
  const out: Record<string, unknown> = {};
  header.forEach((name, i) => {
    const cell = (fields[i] ?? '').trim();
    if (cell === '' || name === '') return;
    out[name] = numeric.includes(name) && NUMBER.test(cell) ? Number(cell) : cell;
  });
  return out;
}

function weeksCell(value: Record<string, unknown>): unknown {
  if (typeof value.weeks !== 'string') return value.weeks;
  try {
    return JSON.parse(value.weeks);
  } catch {
    return value.weeks; // stays text; validation reports "must be a list of weeks"
  }
}

/** Turns CSV rows (header first) into record objects of `type`. */
export async function* csvRecords(type: InputType, rows: AsyncIterable<CsvRow | CsvProblem>): AsyncGenerator<CsvRecord | CsvProblem> {
  let header: string[] | undefined;
  let group: { line: number; value: Record<string, unknown>; weeks: unknown[] } | undefined;
  for await (const row of rows) {
    if ('message' in row) {
      yield row;
      continue;
    }
    if (header === undefined) {
      header = row.fields.map((f) => f.trim());
      continue;
    }
    const value = toObject(type, header, row.fields);
    if (type !== 'baseline-version' || 'weeks' in value || !('weekStart' in value)) {
      if (group) yield { line: group.line, value: { ...group.value, weeks: group.weeks } };
      group = undefined;
      yield { line: row.line, value: type === 'baseline-version' ? { ...value, weeks: weeksCell(value) } : value };
      continue;
    }
    const week = { weekStart: value.weekStart, quantity: value.quantity };
    if (group && group.value.eventId === value.eventId) {
      group.weeks.push(week);
      continue;
    }
    if (group) yield { line: group.line, value: { ...group.value, weeks: group.weeks } };
    const { weekStart: _w, quantity: _q, ...rest } = value;
    group = { line: row.line, value: rest, weeks: [week] };
  }
  if (group) yield { line: group.line, value: { ...group.value, weeks: group.weeks } };
}
