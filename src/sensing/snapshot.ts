import { createLocationCalendar } from '../calendar/location-calendar.ts';
import type { Location } from '../contracts/location.ts';
import { NearcastError } from '../errors.ts';
import { Arena } from './arena.ts';
import { decodeColumn, decodeTypedColumn, encodeColumn, type ColumnAlloc } from './column-codec.ts';
import { Table, type ColumnSpec } from './columns.ts';
import type { LocationState } from './location-state.ts';
import { createSeriesState, LINE_COLUMNS, reindexSeries, SHIPMENT_COLUMNS, type BaselineVersionEntry, type SeriesState } from './series-state.ts';

// The canonical JSON form of a location state: rows in knowledge order, customers sorted, series by item. The same
// records applied in any arrival order give the same snapshot, byte for byte. Version 2 writes every numeric column
// in the compact text form of column-codec.ts (version 1 wrote plain number lists; it still restores).

export const STATE_SCHEMA = 'nearcast.sensing-state.v2';
const STATE_SCHEMA_V1 = 'nearcast.sensing-state.v1';

const SAVED_LINE_COLUMNS = (({ prevSameLine: _omit, ...rest }) => rest)(LINE_COLUMNS);

/** A baseline version as version 1 saved it, one object per version. */
export interface BaselineSnapshotV1 {
  readonly version: number;
  readonly eventHash: number;
  readonly publishedMs: number;
  readonly knownMs: number;
  readonly knownDay: number;
  readonly weeks: number[];
  readonly quantities: number[];
}

/**
 * Version 2: the versions as columns (one value per version), their weeks and quantities concatenated in version
 * order, `weekCount` weeks per version.
 */
export interface BaselineColumnsSnapshot {
  readonly version: string;
  readonly eventHash: string;
  readonly publishedMs: string;
  readonly knownMs: string;
  readonly knownDay: string;
  readonly weekCount: string;
  readonly weeks: string;
  readonly quantities: string;
}

export interface SeriesSnapshot {
  readonly item: string;
  /** Columns in the text form of column-codec.ts (plain number lists in version 1). */
  readonly lines: Record<string, string | number[]>;
  readonly shipments: Record<string, string | number[]>;
  readonly baselines: BaselineColumnsSnapshot | readonly BaselineSnapshotV1[];
  /** First activity of rows a prune dropped (see SeriesState); absent when nothing was dropped. */
  readonly prunedFirstRequested?: number;
  readonly prunedFirstShipped?: number;
}

export interface LocationStateSnapshot {
  readonly schema: typeof STATE_SCHEMA;
  readonly location: string;
  readonly master: Location;
  readonly watermarkMs: number | null;
  readonly retentionWeeks: number;
  readonly tooLateWeeks: number;
  readonly customers: string[];
  readonly closedDays: number[];
  readonly series: SeriesSnapshot[];
}

function order(n: number, cmp: (a: number, b: number) => number): number[] {
  const idx = Array.from({ length: n }, (_, i) => i);
  idx.sort(cmp);
  return idx;
}

/** The table's columns in the given row order, as numbers (`map` rewrites a column's values on the way). */
function columnsInOrder(table: Table<Record<string, 'f64' | 'i32'>>, names: readonly string[], idx: number[], map?: Record<string, (v: number) => number>) {
  const out: Record<string, Float64Array> = {};
  for (const name of names) {
    const col = table.cols[name]!;
    const f = map?.[name];
    const values = new Float64Array(idx.length);
    for (let k = 0; k < idx.length; k++) values[k] = f ? f(col[idx[k]!]!) : col[idx[k]!]!;
    out[name] = values;
  }
  return out;
}

function encodedColumns(cols: Record<string, Float64Array>): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [name, values] of Object.entries(cols)) out[name] = encodeColumn(values);
  return out;
}

function baselineColumns(baselines: readonly BaselineVersionEntry[]): BaselineColumnsSnapshot {
  const weeks: number[] = [];
  const quantities: number[] = [];
  for (const b of baselines) {
    for (let i = 0; i < b.weeks.length; i++) {
      weeks.push(b.weeks[i]!);
      quantities.push(b.quantities[i]!);
    }
  }
  return {
    version: encodeColumn(baselines.map((b) => b.version)),
    eventHash: encodeColumn(baselines.map((b) => b.eventHash)),
    publishedMs: encodeColumn(baselines.map((b) => b.publishedMs)),
    knownMs: encodeColumn(baselines.map((b) => b.knownMs)),
    knownDay: encodeColumn(baselines.map((b) => b.knownDay)),
    weekCount: encodeColumn(baselines.map((b) => b.weeks.length)),
    weeks: encodeColumn(weeks),
    quantities: encodeColumn(quantities),
  };
}

/** The saved versions as version-1 objects (either form in, undefined when damaged). */
export function baselineList(saved: unknown): BaselineSnapshotV1[] | undefined {
  if (Array.isArray(saved)) return saved as BaselineSnapshotV1[];
  if (saved === null || typeof saved !== 'object') return undefined;
  const c = saved as Record<string, unknown>;
  const [version, eventHash, publishedMs, knownMs, knownDay, weekCount, weeks, quantities] = (
    ['version', 'eventHash', 'publishedMs', 'knownMs', 'knownDay', 'weekCount', 'weeks', 'quantities'] as const
  ).map((k) => columnValues(c[k]));
  if (!version || !eventHash || !publishedMs || !knownMs || !knownDay || !weekCount || !weeks || !quantities) return undefined;
  const n = version.length;
  if ([eventHash, publishedMs, knownMs, knownDay, weekCount].some((col) => col.length !== n) || weeks.length !== quantities.length) return undefined;
  const out: BaselineSnapshotV1[] = [];
  let at = 0;
  for (let i = 0; i < n; i++) {
    const count = weekCount[i]!;
    if (!Number.isInteger(count) || count < 0 || at + count > weeks.length) return undefined;
    out.push({
      version: version[i]!,
      eventHash: eventHash[i]!,
      publishedMs: publishedMs[i]!,
      knownMs: knownMs[i]!,
      knownDay: knownDay[i]!,
      weeks: weeks.slice(at, at + count),
      quantities: quantities.slice(at, at + count),
    });
    at += count;
  }
  return at === weeks.length ? out : undefined;
}

/**
 * A series as its snapshot holds it, before the text form: rows in snapshot order as numbers, the baseline versions
 * as the state keeps them. The runtime saves a series in parts and needs the numbers, not their text (series-tail.ts).
 */
export interface SeriesColumns {
  readonly item: string;
  readonly lines: Readonly<Record<string, Float64Array>>;
  readonly shipments: Readonly<Record<string, Float64Array>>;
  readonly baselines: readonly BaselineVersionEntry[];
  readonly prunedFirstRequested?: number;
  readonly prunedFirstShipped?: number;
}

function sortedCustomers(state: LocationState): string[] {
  return [...state.customers].sort();
}

/** The named series' columns (sorted by item; names the state does not hold are skipped), customers numbered as the snapshot numbers them. */
export function seriesColumns(state: LocationState, items: Iterable<string>): SeriesColumns[] {
  const sorted = sortedCustomers(state);
  const rank = new Map(sorted.map((c, i) => [c, i]));
  const remap = state.customers.map((c) => rank.get(c)!);
  const customer = (v: number) => (v < 0 ? -1 : remap[v]!);
  return [...new Set(items)]
    .filter((item) => state.series.has(item))
    .sort()
    .map((item): SeriesColumns => {
      const s = state.series.get(item)!;
      const L = s.lines.cols;
      const li = order(s.lines.length, (a, b) => L.knownMs[a]! - L.knownMs[b]! || L.lineHash[a]! - L.lineHash[b]! || L.revision[a]! - L.revision[b]!);
      const S = s.shipments.cols;
      const si = order(s.shipments.length, (a, b) => S.knownMs[a]! - S.knownMs[b]! || S.shipmentHash[a]! - S.shipmentHash[b]!);
      return {
        item,
        lines: columnsInOrder(s.lines as never, Object.keys(SAVED_LINE_COLUMNS), li, { customer }),
        shipments: columnsInOrder(s.shipments as never, Object.keys(SHIPMENT_COLUMNS), si),
        baselines: s.baselines,
        ...(Number.isFinite(s.prunedFirstRequested) ? { prunedFirstRequested: s.prunedFirstRequested } : {}),
        ...(Number.isFinite(s.prunedFirstShipped) ? { prunedFirstShipped: s.prunedFirstShipped } : {}),
      };
    });
}

/** A series' snapshot entry (the text form of its columns). */
export function encodeSeries(c: SeriesColumns): SeriesSnapshot {
  return {
    item: c.item,
    lines: encodedColumns(c.lines),
    shipments: encodedColumns(c.shipments),
    baselines: baselineColumns(c.baselines),
    ...(c.prunedFirstRequested !== undefined ? { prunedFirstRequested: c.prunedFirstRequested } : {}),
    ...(c.prunedFirstShipped !== undefined ? { prunedFirstShipped: c.prunedFirstShipped } : {}),
  };
}

export function snapshotLocationState(state: LocationState): LocationStateSnapshot {
  return {
    schema: STATE_SCHEMA,
    location: state.location,
    master: state.master,
    watermarkMs: state.watermarkMs,
    retentionWeeks: state.retentionWeeks,
    tooLateWeeks: state.tooLateWeeks,
    customers: sortedCustomers(state),
    closedDays: [...state.closedDays].sort((a, b) => a - b),
    series: seriesColumns(state, state.series.keys()).map(encodeSeries),
  };
}

function corrupt(detail: string): never {
  throw new NearcastError('NEARCAST_STATE_CORRUPT', [detail]);
}

/** A saved column's values: decoded text (version 2) or a plain list (version 1); undefined when damaged. */
function columnValues(saved: unknown): number[] | undefined {
  if (Array.isArray(saved)) return saved as number[];
  return typeof saved === 'string' ? decodeColumn(saved) : undefined;
}

// A restore decodes each series' columns into scratch space, then copies them into one buffer per table (and one
// for all its baseline versions): an array buffer per column or per baseline version was most of a 100k-series
// restore's allocations and of its collector's work.
const scratch = new Arena(1 << 20);
const scratchAlloc: ColumnAlloc = (kind, n) => (kind === 'f64' ? scratch.f64(n) : scratch.i32(n));

/** A saved table's columns as typed arrays of their kinds (scratch views); a column is undefined when damaged or not finite. */
function typedColumns(spec: ColumnSpec, saved: unknown): Record<string, Float64Array | Int32Array | undefined> | undefined {
  if (saved === null || typeof saved !== 'object') return undefined;
  const out: Record<string, Float64Array | Int32Array | undefined> = {};
  for (const [name, kind] of Object.entries(spec)) {
    const col = (saved as Record<string, unknown>)[name];
    if (typeof col === 'string') out[name] = decodeTypedColumn(col, kind, scratchAlloc);
    // Plain lists: version 1, and rows a series' tail appended to its last full save (series-tail.ts).
    else if (Array.isArray(col) && col.every((v) => typeof v === 'number' && Number.isFinite(v))) {
      const values = scratchAlloc(kind, col.length);
      values.set(col as number[]);
      out[name] = values;
    }
  }
  return out;
}

function tableOf<S extends ColumnSpec>(spec: S, saved: unknown, unsaved?: Partial<Record<keyof S & string, number>>): Table<S> | undefined {
  const cols = typedColumns(spec, saved);
  return cols && Table.fromColumns(spec, cols, unsaved);
}

/** The baseline versions of a saved series, their weeks and quantities views of one buffer (NEARCAST_STATE_CORRUPT when damaged). */
function restoreBaselines(item: string, saved: unknown): BaselineVersionEntry[] {
  const baselines = baselineList(saved);
  if (!baselines) corrupt(`series ${item}: baselines are incomplete`);
  let total = 0;
  const decoded = baselines.map((b) => {
    const weeks = columnValues(b?.weeks);
    const quantities = columnValues(b?.quantities);
    if (!weeks || !quantities || weeks.length !== quantities.length) {
      corrupt(`series ${item}: a baseline version has mismatched weeks`);
    }
    for (const k of ['version', 'eventHash', 'publishedMs', 'knownMs', 'knownDay'] as const) {
      if (!Number.isFinite(b[k])) corrupt(`series ${item}: baseline ${k} is not a number`);
    }
    total += weeks.length;
    return { weeks, quantities };
  });
  const buffer = new ArrayBuffer(12 * total);
  let at = 0;
  return baselines.map((b, k) => {
    const values = decoded[k]!;
    const n = values.weeks.length;
    const quantities = new Float64Array(buffer, 8 * at, n);
    const weeks = new Int32Array(buffer, 8 * total + 4 * at, n);
    quantities.set(values.quantities);
    weeks.set(values.weeks);
    at += n;
    return { version: b.version, eventHash: b.eventHash, publishedMs: b.publishedMs, knownMs: b.knownMs, knownDay: b.knownDay, weeks, quantities };
  });
}

function restoreSeries(snap: SeriesSnapshot, customers: number): SeriesState {
  if (typeof snap?.item !== 'string') corrupt('a series has no item');
  // Tables made of the decoded columns themselves: appending row by row cost an object per row and repeated
  // regrowth, and decoding into plain lists a copy of every value, most of a large restore's time and garbage.
  // prevSameLine is not saved; reindexSeries rebuilds it.
  scratch.reset();
  const lines = tableOf(LINE_COLUMNS, snap.lines, { prevSameLine: -1 });
  const shipments = tableOf(SHIPMENT_COLUMNS, snap.shipments);
  if (!lines) corrupt(`series ${snap.item}: order lines are incomplete`);
  if (!shipments) corrupt(`series ${snap.item}: shipments are incomplete`);
  const customer = lines.cols.customer;
  for (let i = 0; i < lines.length; i++) {
    if (customer[i]! >= customers || customer[i]! < -1) corrupt(`series ${snap.item}: a line names an unknown customer`);
  }
  const s = createSeriesState(snap.item, { lines, shipments });
  s.baselines.push(...restoreBaselines(snap.item, snap.baselines));
  s.baselines.sort((a, b) => a.version - b.version);
  for (const k of ['prunedFirstRequested', 'prunedFirstShipped'] as const) {
    const v: unknown = snap[k];
    if (v === undefined) continue;
    if (!Number.isSafeInteger(v)) corrupt(`series ${snap.item}: ${k} is not a day number`);
    s[k] = v as number;
  }
  reindexSeries(s);
  return s;
}

/** Rebuilds a location state from its snapshot; NEARCAST_STATE_CORRUPT says what is wrong. */
export function restoreLocationState(snapshot: unknown): LocationState {
  const snap = snapshot as LocationStateSnapshot;
  if (snap === null || typeof snap !== 'object' || (snap.schema !== STATE_SCHEMA && (snap.schema as string) !== STATE_SCHEMA_V1)) {
    corrupt(`not a ${STATE_SCHEMA} snapshot`);
  }
  if (typeof snap.location !== 'string' || snap.master?.location !== snap.location) corrupt('location and master data disagree');
  // The series may also come as an iterable read once (a runtime assembling them part by part, so that a large
  // restore never holds every series' saved form at once).
  const series: unknown = snap.series;
  const iterable = Array.isArray(series) || (typeof series === 'object' && series !== null && Symbol.iterator in series);
  if (!Array.isArray(snap.customers) || !iterable || !Array.isArray(snap.closedDays)) corrupt('lists are missing');
  let calendar;
  try {
    calendar = createLocationCalendar(snap.master);
  } catch {
    corrupt('the master data does not give a valid calendar');
  }
  const state: LocationState = {
    location: snap.location,
    master: snap.master,
    calendar,
    watermarkMs: snap.watermarkMs ?? null,
    retentionWeeks: snap.retentionWeeks,
    tooLateWeeks: snap.tooLateWeeks,
    series: new Map(),
    customers: [...snap.customers],
    customerIndex: new Map(snap.customers.map((c, i) => [c, i])),
    closedDays: new Set(snap.closedDays),
  };
  for (const s of series as Iterable<SeriesSnapshot>) state.series.set(s.item, restoreSeries(s, snap.customers.length));
  return state;
}

/** An independent copy (the runtime applies a batch to a copy and keeps it only after its commit). */
export function cloneLocationState(state: LocationState): LocationState {
  return restoreLocationState(JSON.parse(JSON.stringify(snapshotLocationState(state))));
}
