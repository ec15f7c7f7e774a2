import { HashIndex } from './hash-index.ts';
import { Table } from './columns.ts';

// One series (location, item): its order-line revisions, shipments and baseline versions, each stored with the
// instant nearcast learned of it (knowledge time). Everything else is derived from these three tables.

export const LINE_COLUMNS = {
  lineHash: 'f64',
  revision: 'i32',
  /** Effective knowledge instant (ms): changedAt (orderedAt for revision 1), or later if it arrived late. */
  knownMs: 'f64',
  knownDay: 'i32',
  orderedDay: 'i32',
  requestedDay: 'i32',
  /** Full new quantity of the line (0 for a cancel). */
  quantity: 'f64',
  /** Index in the location's customer dictionary, −1 when unknown. */
  customer: 'i32',
  eventHash: 'f64',
  /** Previous row of the same line in arrival order (−1 none); rebuilt on restore, never saved. */
  prevSameLine: 'i32',
} as const;

export const SHIPMENT_COLUMNS = {
  shipmentHash: 'f64',
  eventHash: 'f64',
  knownMs: 'f64',
  knownDay: 'i32',
  shipDay: 'i32',
  quantity: 'f64',
  /** Hash of the shipped order line, −1 when the shipment names none. */
  lineHash: 'f64',
} as const;

export type LineTable = Table<typeof LINE_COLUMNS>;
export type ShipmentTable = Table<typeof SHIPMENT_COLUMNS>;

export interface BaselineVersionEntry {
  readonly version: number;
  readonly eventHash: number;
  readonly publishedMs: number;
  readonly knownMs: number;
  readonly knownDay: number;
  /** Week start days, ascending, and the quantity of each week. */
  weeks: Int32Array;
  quantities: Float64Array;
}

export interface SeriesState {
  readonly item: string;
  readonly lines: LineTable;
  /** Last row (in arrival order) of each line, by line hash. */
  readonly lineHeads: HashIndex;
  readonly shipments: ShipmentTable;
  readonly shipmentIds: HashIndex;
  /** Sorted by version ascending, each version once (apply rejects a repeated version as a duplicate). */
  readonly baselines: BaselineVersionEntry[];
  readonly eventIds: HashIndex;
  /** Bumped on every change; derived views cache on it. */
  changeCount: number;
  /** Bumped when rows are removed or re-indexed, or the calendar changes: views built by appending start over. */
  layoutCount: number;
  /**
   * Earliest requested day of a positive line, and earliest ship day, among the rows a prune has dropped (Infinity
   * when none). A series' first activity must not move when its oldest rows leave: it decides which weeks the
   * series existed in and how many weeks of history it has, so a prune would otherwise change past as-of signals.
   */
  prunedFirstRequested: number;
  prunedFirstShipped: number;
}

/** A new series; a restore passes the tables it loaded (reindexSeries must follow). */
export function createSeriesState(item: string, tables?: { readonly lines: LineTable; readonly shipments: ShipmentTable }): SeriesState {
  const shapes = [
    { capacity: tables?.lines.length, values: true },
    { capacity: tables?.shipments.length, values: false },
    { capacity: tables ? tables.lines.length + tables.shipments.length : undefined, values: false },
  ];
  const [lineHeads, shipmentIds, eventIds] = tables ? HashIndex.together(shapes) : shapes.map((shape) => new HashIndex(shape));
  return {
    item,
    lines: tables?.lines ?? new Table(LINE_COLUMNS, 8),
    lineHeads: lineHeads!,
    shipments: tables?.shipments ?? new Table(SHIPMENT_COLUMNS, 4),
    shipmentIds: shipmentIds!,
    baselines: [],
    eventIds: eventIds!,
    changeCount: 0,
    layoutCount: 0,
    prunedFirstRequested: Infinity,
    prunedFirstShipped: Infinity,
  };
}

/** Rebuilds the indexes of a series from its tables (after a restore or a prune). */
export function reindexSeries(s: SeriesState): void {
  s.lineHeads.clear();
  s.shipmentIds.clear();
  s.eventIds.clear();
  const L = s.lines.cols;
  for (let i = 0; i < s.lines.length; i++) {
    const h = L.lineHash[i]!;
    L.prevSameLine[i] = s.lineHeads.get(h);
    s.lineHeads.set(h, i);
    s.eventIds.add(L.eventHash[i]!);
  }
  const S = s.shipments.cols;
  for (let i = 0; i < s.shipments.length; i++) {
    s.shipmentIds.add(S.shipmentHash[i]!);
    s.eventIds.add(S.eventHash[i]!);
  }
  for (const b of s.baselines) s.eventIds.add(b.eventHash);
  s.changeCount++;
  s.layoutCount++;
}

/** Highest revision stored for a line, 0 when the line is unknown. */
export function highestRevision(s: SeriesState, lineHash: number): number {
  let best = 0;
  for (let i = s.lineHeads.get(lineHash); i >= 0; i = s.lines.cols.prevSameLine[i]!) {
    if (s.lines.cols.revision[i]! > best) best = s.lines.cols.revision[i]!;
  }
  return best;
}

export function hasRevision(s: SeriesState, lineHash: number, revision: number): boolean {
  for (let i = s.lineHeads.get(lineHash); i >= 0; i = s.lines.cols.prevSameLine[i]!) {
    if (s.lines.cols.revision[i] === revision) return true;
  }
  return false;
}
