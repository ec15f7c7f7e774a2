import { createHash } from 'node:crypto';
import { NearcastError } from '../../errors.ts';
import { decodeColumn, encodeColumn, encodeSeries, type LocationStateSnapshot, type SeriesColumns } from '../../sensing/index.ts';

export type SeriesSnapshot = LocationStateSnapshot['series'][number];

// A series' saved rows grow with every fact, and a batch used to rewrite all of them for each series it touched, so
// the changelog grew with the square of a series' history. Rows are saved in knowledge order, so new facts nearly
// always land after the rows already saved: the series is then saved as its last full save (`f:<item>`) plus the
// rows after it (`s:<item>`, the tail), and a batch rewrites only the tail. Whenever the saved prefix no longer
// holds (a prune, a row that sorts earlier, new baselines, customers renumbered) or the tail outgrows half the
// full save, the series is saved in full again (a new `f:` and an empty tail). The save works from the series'
// columns as numbers: a tail save puts only the tail into the sensing state's compact text form.

/** What a tail part holds: the rows after the full save's, per table and column (text form). */
export interface SeriesTail {
  readonly tail: 1;
  readonly lines: Record<string, string>;
  readonly shipments: Record<string, string>;
}

type Saved = Record<string, string | number[]>;
type Columns = Readonly<Record<string, Float64Array>>;

/** A saved table's columns as numbers (text form or plain lists). */
function plain(cols: Saved): Record<string, number[]> {
  const out: Record<string, number[]> = {};
  for (const [name, col] of Object.entries(cols)) {
    const values = typeof col === 'string' ? decodeColumn(col) : col;
    if (values === undefined) throw new NearcastError('NEARCAST_STATE_CORRUPT', [`saved column ${name} is damaged`]);
    out[name] = values;
  }
  return out;
}

/** The rows from `from` on, in text form. */
function encodedFrom(cols: Columns, from: number): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [name, values] of Object.entries(cols)) out[name] = encodeColumn(values.subarray(from));
  return out;
}

/** What the model remembers of a series' last full save: its row counts and a digest of its content. */
export interface FullSave {
  readonly lines: number;
  readonly shipments: number;
  readonly digest: string;
}

function rows(cols: Columns): number {
  const first = Object.values(cols)[0];
  return first ? first.length : 0;
}

/**
 * Over the numbers' bits rather than their text (cheaper). Digests are compared only within one process, with the
 * full save the same process made, so their form can change between versions.
 */
function digestOf(c: SeriesColumns, lines: number, shipments: number): string {
  const hash = createHash('sha256').update(JSON.stringify([c.item, c.prunedFirstRequested ?? null, c.prunedFirstShipped ?? null, c.baselines.length]));
  const bytes = (a: Float64Array | Int32Array) => new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
  for (const b of c.baselines) {
    hash.update(bytes(Float64Array.of(b.version, b.eventHash, b.publishedMs, b.knownMs, b.knownDay, b.weeks.length)));
    hash.update(bytes(b.weeks));
    hash.update(bytes(b.quantities));
  }
  const add = (table: string, cols: Columns, n: number) => {
    for (const [name, values] of Object.entries(cols)) {
      hash.update(`\u0000${table}.${name}:${n}:`);
      hash.update(bytes(values.subarray(0, n)));
    }
  };
  add('lines', c.lines, lines);
  add('shipments', c.shipments, shipments);
  return hash.digest('hex');
}

export type SeriesSave = { readonly kind: 'full'; readonly full: SeriesSnapshot; readonly tail: SeriesTail; readonly save: FullSave } | { readonly kind: 'tail'; readonly tail: SeriesTail };

/** How to save a series now, given its last full save (undefined: none known, e.g. after a restore). */
export function seriesSave(c: SeriesColumns, last: FullSave | undefined): SeriesSave {
  const nLines = rows(c.lines);
  const nShipments = rows(c.shipments);
  if (last && last.lines <= nLines && last.shipments <= nShipments) {
    const added = nLines - last.lines + (nShipments - last.shipments);
    if (added * 2 <= Math.max(32, last.lines + last.shipments) && digestOf(c, last.lines, last.shipments) === last.digest) {
      return { kind: 'tail', tail: { tail: 1, lines: encodedFrom(c.lines, last.lines), shipments: encodedFrom(c.shipments, last.shipments) } };
    }
  }
  return {
    kind: 'full',
    full: encodeSeries(c),
    tail: { tail: 1, lines: encodedFrom(c.lines, nLines), shipments: encodedFrom(c.shipments, nShipments) },
    save: { lines: nLines, shipments: nShipments, digest: digestOf(c, nLines, nShipments) },
  };
}

export function isSeriesTail(value: unknown): value is SeriesTail {
  return typeof value === 'object' && value !== null && (value as { tail?: unknown }).tail === 1;
}

/** The series as saved: its full save with the tail's rows appended (same key order as a snapshot's own). */
export function joinTail(full: SeriesSnapshot, tail: SeriesTail): SeriesSnapshot {
  const join = (a: Saved, b: Saved) => {
    const out: Saved = {};
    const more = plain(b);
    for (const [name, col] of Object.entries(a)) {
      const extra = more[name];
      out[name] = extra && extra.length > 0 ? [...plain({ [name]: col })[name]!, ...extra] : col;
    }
    return out;
  };
  return { ...full, lines: join(full.lines, tail.lines), shipments: join(full.shipments, tail.shipments) };
}
