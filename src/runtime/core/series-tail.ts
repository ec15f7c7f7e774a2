import { createHash } from 'node:crypto';
import { NearcastError } from '../../errors.ts';
import { decodeColumn, encodeColumn, type LocationStateSnapshot } from '../../sensing/index.ts';

export type SeriesSnapshot = LocationStateSnapshot['series'][number];

// A series' saved rows grow with every fact, and a batch used to rewrite all of them for each series it touched, so
// the changelog grew with the square of a series' history. Rows are saved in knowledge order, so new facts nearly
// always land after the rows already saved: the series is then saved as its last full save (`f:<item>`) plus the
// rows after it (`s:<item>`, the tail), and a batch rewrites only the tail. Whenever the saved prefix no longer
// holds (a prune, a row that sorts earlier, new baselines, customers renumbered) or the tail outgrows half the
// full save, the series is saved in full again (a new `f:` and an empty tail). The snapshot's columns come in the
// sensing state's compact text form; the tail is cut from the decoded values and written in that form too.

/** What a tail part holds: the rows after the full save's, per table and column (text form). */
export interface SeriesTail {
  readonly tail: 1;
  readonly lines: Record<string, string>;
  readonly shipments: Record<string, string>;
}

type Saved = Record<string, string | number[]>;
type Plain = Record<string, number[]>;

/** A saved table's columns as numbers (text form or plain lists). */
function plain(cols: Saved): Plain {
  const out: Plain = {};
  for (const [name, col] of Object.entries(cols)) {
    const values = typeof col === 'string' ? decodeColumn(col) : col;
    if (values === undefined) throw new NearcastError('NEARCAST_STATE_CORRUPT', [`saved column ${name} is damaged`]);
    out[name] = values;
  }
  return out;
}

function encoded(cols: Plain): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [name, values] of Object.entries(cols)) out[name] = encodeColumn(values);
  return out;
}

/** What the model remembers of a series' last full save: its row counts and a digest of its content. */
export interface FullSave {
  readonly lines: number;
  readonly shipments: number;
  readonly digest: string;
}

function rows(cols: Plain): number {
  const first = Object.values(cols)[0];
  return first ? first.length : 0;
}

function slice(cols: Plain, from: number, to?: number): Plain {
  const out: Plain = {};
  for (const [name, values] of Object.entries(cols)) out[name] = values.slice(from, to);
  return out;
}

/** Over the numbers' bits rather than their JSON text (cheaper; a -0 that JSON would write as 0 only forces a full save). */
function digestOf(snap: SeriesSnapshot, linesCols: Plain, shipmentCols: Plain, lines: number, shipments: number): string {
  const hash = createHash('sha256').update(JSON.stringify([snap.item, snap.baselines, snap.prunedFirstRequested ?? null, snap.prunedFirstShipped ?? null]));
  const add = (table: string, cols: Plain, n: number) => {
    for (const [name, values] of Object.entries(cols)) {
      hash.update(`\u0000${table}.${name}:${n}:`);
      const bits = new Float64Array(n);
      for (let i = 0; i < n; i++) bits[i] = values[i]!;
      hash.update(new Uint8Array(bits.buffer));
    }
  };
  add('lines', linesCols, lines);
  add('shipments', shipmentCols, shipments);
  return hash.digest('hex');
}

export type SeriesSave = { readonly kind: 'full'; readonly full: SeriesSnapshot; readonly tail: SeriesTail; readonly save: FullSave } | { readonly kind: 'tail'; readonly tail: SeriesTail };

/** How to save a series now, given its last full save (undefined: none known, e.g. after a restore). */
export function seriesSave(snap: SeriesSnapshot, last: FullSave | undefined): SeriesSave {
  const lines = plain(snap.lines);
  const shipments = plain(snap.shipments);
  const nLines = rows(lines);
  const nShipments = rows(shipments);
  if (last && last.lines <= nLines && last.shipments <= nShipments) {
    const added = nLines - last.lines + (nShipments - last.shipments);
    if (added * 2 <= Math.max(32, last.lines + last.shipments) && digestOf(snap, lines, shipments, last.lines, last.shipments) === last.digest) {
      return { kind: 'tail', tail: { tail: 1, lines: encoded(slice(lines, last.lines)), shipments: encoded(slice(shipments, last.shipments)) } };
    }
  }
  return {
    kind: 'full',
    full: snap,
    tail: { tail: 1, lines: encoded(slice(lines, nLines)), shipments: encoded(slice(shipments, nShipments)) },
    save: { lines: nLines, shipments: nShipments, digest: digestOf(snap, lines, shipments, nLines, nShipments) },
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
