import { weekStartOf } from '../calendar/weeks.ts';
import { weekValue } from './baseline-lookup.ts';
import { HashIndex } from './hash-index.ts';
import type { SensingSettings } from './settings.ts';
import type { BaselineVersionEntry, SeriesState } from './series-state.ts';

// The order lines of a series as a signed log of contributions in knowledge order. When a revision becomes the
// line's highest known one it withdraws the previous revision's contribution and adds its own (each with its own
// requested date, so a moved date moves the quantity). Any linear view — demand by requested date, the order book
// as known on day D, intake by order date — is then a sum over the parts known by D.

export const PART_LARGE = 1;
export const PART_FIRST_FILL = 2;

export interface SeriesParts {
  readonly n: number;
  readonly knownMs: Float64Array;
  readonly knownDay: Int32Array;
  readonly requestedDay: Int32Array;
  readonly orderedDay: Int32Array;
  /** Knowledge day of the line's first revision (for survival of what was booked by then). */
  readonly firstKnownDay: Int32Array;
  readonly customer: Int32Array;
  readonly flags: Int32Array;
  readonly quantity: Float64Array;
  /** Shipments in knowledge order. */
  readonly shipments: { readonly n: number; readonly knownMs: Float64Array; readonly knownDay: Int32Array; readonly shipDay: Int32Array; readonly quantity: Float64Array; readonly lagDays: Int32Array };
  /** Earliest day anything is known of the series (orders or shipments), or null. */
  readonly firstActivityDay: number | null;
}

const LAG_UNKNOWN = -1_000_000;
export { LAG_UNKNOWN };

/**
 * The highest version known by each instant asked for, asked in non-decreasing instants (lines in knowledge
 * order): the versions are walked once in order of knowledge instead of scanned for every line. Versions known
 * after every instant asked so far can still be added.
 */
class KnownVersion {
  private readonly byKnown: BaselineVersionEntry[];
  private next = 0;
  private best: BaselineVersionEntry | undefined;
  /** Latest instant asked for. */
  lastAskedMs = -Infinity;

  constructor(baselines: readonly BaselineVersionEntry[]) {
    this.byKnown = [...baselines].sort((a, b) => (a.knownMs < b.knownMs ? -1 : a.knownMs > b.knownMs ? 1 : 0));
  }

  /** Adds a version; false when an instant already asked for would have seen it (the walk must start over). */
  add(b: BaselineVersionEntry): boolean {
    if (b.knownMs <= this.lastAskedMs) return false;
    let k = this.byKnown.length;
    while (k > this.next && this.byKnown[k - 1]!.knownMs > b.knownMs) k--;
    this.byKnown.splice(k, 0, b);
    return true;
  }

  at(knownMs: number): BaselineVersionEntry | undefined {
    this.lastAskedMs = knownMs;
    while (this.next < this.byKnown.length && this.byKnown[this.next]!.knownMs <= knownMs) {
      const b = this.byKnown[this.next++]!;
      if (this.best === undefined || b.version > this.best.version) this.best = b;
    }
    return this.best;
  }
}

function median(values: readonly number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

const HISTORY = 20;

function grow<T extends Float64Array | Int32Array>(a: T, size: number): T {
  if (a.length >= size) return a;
  const next = new (a.constructor as new (n: number) => T)(Math.max(size, 2 * a.length, 16));
  next.set(a);
  return next;
}

/**
 * Walks a series' line rows in knowledge order and emits their parts. It keeps its running state (each line's
 * current row, customers seen, recent line sizes), so rows known after every row walked so far are appended
 * exactly as a walk from scratch would place them: a day's new records cost their own parts, not the history's.
 */
class PartsWalk {
  n = 0;
  knownMs = new Float64Array(0);
  knownDay = new Int32Array(0);
  requestedDay = new Int32Array(0);
  orderedDay = new Int32Array(0);
  firstKnownDay = new Int32Array(0);
  customer = new Int32Array(0);
  flags = new Int32Array(0);
  quantity = new Float64Array(0);
  /** Rows of the line table walked (all rows below this index). */
  rowsDone = 0;
  /** Sort key of the last row walked. */
  private lastMs = -Infinity;
  private lastHash = -Infinity;
  private lastRevision = -Infinity;
  /** Each line's current (highest) row, by line hash (a typed index: every shipment looks its line up at each close). */
  private readonly current = new HashIndex();
  private rowFlags = new Int32Array(0);
  private rowFirst = new Int32Array(0);
  private readonly byCustomer = new Map<number, number[]>();
  private readonly seriesSizes: number[] = [];
  private readonly seenCustomers = new Set<number>();
  firstActivity: number | null = null;
  /** Shipment rows in knowledge order (see shipmentOrder), and how many rows of the table they cover. */
  private shipOrder = new Int32Array(0);
  private shipRows = 0;
  /**
   * The shipments' columns in knowledge order, kept from one call to the next: positions below `shipCopied` hold
   * their rows' values (a day's shipments only append). A close thus makes no new arrays per series: each fresh
   * array buffer is an allocation the engine accounts and sweeps on its own (five per series cost about half a
   * second a close at 10k series).
   */
  private shipCols = { knownMs: new Float64Array(0), knownDay: new Int32Array(0), shipDay: new Int32Array(0), quantity: new Float64Array(0), lagDays: new Int32Array(0) };
  private shipCopied = 0;
  /** Earliest ship day among the shipment table's rows below `shipMinRows`. */
  private shipMinDay: number | null = null;
  private shipMinRows = 0;
  readonly known: KnownVersion;
  readonly baselinesSeen: Set<BaselineVersionEntry>;

  constructor(
    readonly series: SeriesState,
    readonly settings: SensingSettings,
    readonly weekStart: number,
  ) {
    this.known = new KnownVersion(series.baselines);
    this.baselinesSeen = new Set(series.baselines);
  }

  /** The flags (PART_…) the walk gave each row of the line table, below `rows` (0 for superseded rows). */
  flagsOfRows(rows: number): Int32Array {
    const out = new Int32Array(rows);
    out.set(this.rowFlags.subarray(0, Math.min(rows, this.rowFlags.length)));
    return out;
  }

  /** Takes the series' new versions and rows; false when they do not all come after what was walked. */
  extend(): boolean {
    for (const b of this.series.baselines) {
      if (this.baselinesSeen.has(b)) continue;
      if (!this.known.add(b)) return false;
      this.baselinesSeen.add(b);
    }
    if (this.baselinesSeen.size !== this.series.baselines.length) return false;
    const L = this.series.lines.cols;
    const n = this.series.lines.length;
    if (n < this.rowsDone) return false;
    const idx: number[] = [];
    for (let i = this.rowsDone; i < n; i++) idx.push(i);
    // Comparisons return −1/0/1 rather than differences of doubles (boxed on every call); same order.
    idx.sort((a, b) => {
      const ka = L.knownMs[a]!;
      const kb = L.knownMs[b]!;
      if (ka !== kb) return ka < kb ? -1 : 1;
      const ha = L.lineHash[a]!;
      const hb = L.lineHash[b]!;
      if (ha !== hb) return ha < hb ? -1 : 1;
      return L.revision[a]! - L.revision[b]!;
    });
    if (idx.length > 0) {
      const r = idx[0]!;
      const k = L.knownMs[r]!;
      const h = L.lineHash[r]!;
      const after = k > this.lastMs || (k === this.lastMs && (h > this.lastHash || (h === this.lastHash && L.revision[r]! > this.lastRevision)));
      if (!after) return false;
    }
    this.walk(idx);
    this.rowsDone = n;
    return true;
  }

  /**
   * The shipment table's rows in knowledge order (ties by shipment hash). Shipments are only ever appended, so the
   * rows added since the last call are sorted on their own and put behind the others when they all sort after
   * them (a day's shipments); otherwise every row is sorted again. The view is valid until the next call.
   */
  shipmentOrder(): Int32Array {
    const S = this.series.shipments.cols;
    const n = this.series.shipments.length;
    if (n === this.shipRows) return this.shipOrder.subarray(0, n);
    const before = (a: number, b: number) => {
      const ka = S.knownMs[a]!;
      const kb = S.knownMs[b]!;
      if (ka !== kb) return ka < kb ? -1 : 1;
      const ha = S.shipmentHash[a]!;
      const hb = S.shipmentHash[b]!;
      return ha < hb ? -1 : ha > hb ? 1 : 0;
    };
    const added: number[] = [];
    for (let i = this.shipRows; i < n; i++) added.push(i);
    added.sort(before);
    const done = this.shipRows;
    const order = grow(this.shipOrder, n);
    if (done > 0 && before(order[done - 1]!, added[0]!) > 0) {
      const all = Array.from({ length: n }, (_, i) => i).sort(before);
      order.set(all);
      this.shipCopied = 0;
    } else {
      order.set(added, done);
    }
    this.shipOrder = order;
    this.shipRows = n;
    return order.subarray(0, n);
  }

  /**
   * The shipments in knowledge order with each one's lag behind its line's requested date, and the earliest ship
   * day. The arrays are the walk's own, valid until the series' next parts (the lags are worked out again each
   * time: a line's new revision can move its requested date).
   */
  shipmentColumns(): { readonly parts: SeriesParts['shipments']; readonly firstShipDay: number | null } {
    const S = this.series.shipments.cols;
    const L = this.series.lines.cols;
    const n = this.series.shipments.length;
    const order = this.shipmentOrder();
    const c = this.shipCols;
    c.knownMs = grow(c.knownMs, n);
    c.knownDay = grow(c.knownDay, n);
    c.shipDay = grow(c.shipDay, n);
    c.quantity = grow(c.quantity, n);
    c.lagDays = grow(c.lagDays, n);
    for (let k = this.shipCopied; k < n; k++) {
      const r = order[k]!;
      c.knownMs[k] = S.knownMs[r]!;
      c.knownDay[k] = S.knownDay[r]!;
      c.shipDay[k] = S.shipDay[r]!;
      c.quantity[k] = S.quantity[r]!;
    }
    this.shipCopied = n;
    for (let k = 0; k < n; k++) {
      const r = order[k]!;
      const lineRow = S.lineHash[r]! >= 0 ? this.current.get(S.lineHash[r]!) : -1;
      c.lagDays[k] = lineRow < 0 ? LAG_UNKNOWN : S.shipDay[r]! - L.requestedDay[lineRow]!;
    }
    for (let r = this.shipMinRows; r < n; r++) if (this.shipMinDay === null || S.shipDay[r]! < this.shipMinDay) this.shipMinDay = S.shipDay[r]!;
    this.shipMinRows = n;
    return {
      parts: { n, knownMs: c.knownMs.subarray(0, n), knownDay: c.knownDay.subarray(0, n), shipDay: c.shipDay.subarray(0, n), quantity: c.quantity.subarray(0, n), lagDays: c.lagDays.subarray(0, n) },
      firstShipDay: this.shipMinDay,
    };
  }

  private reserve(extra: number): void {
    const size = this.n + extra;
    this.knownMs = grow(this.knownMs, size);
    this.knownDay = grow(this.knownDay, size);
    this.requestedDay = grow(this.requestedDay, size);
    this.orderedDay = grow(this.orderedDay, size);
    this.firstKnownDay = grow(this.firstKnownDay, size);
    this.customer = grow(this.customer, size);
    this.flags = grow(this.flags, size);
    this.quantity = grow(this.quantity, size);
  }

  private walk(idx: readonly number[]): void {
    const L = this.series.lines.cols;
    const settings = this.settings;
    // A row emits its own part and, when it outranks an earlier revision, withdraws that one: two at most.
    this.reserve(2 * idx.length);
    this.rowFlags = grow(this.rowFlags, this.series.lines.length);
    this.rowFirst = grow(this.rowFirst, this.series.lines.length);
    const { current, rowFlags, rowFirst, byCustomer, seriesSizes, seenCustomers, known } = this;
    const emit = (row: number, q: number, f: number, first: number, atMs: number, atDay: number) => {
      if (q === 0) return;
      const m = this.n++;
      this.knownMs[m] = atMs;
      this.knownDay[m] = atDay;
      this.requestedDay[m] = L.requestedDay[row]!;
      this.orderedDay[m] = L.orderedDay[row]!;
      this.firstKnownDay[m] = first;
      this.customer[m] = L.customer[row]!;
      this.flags[m] = f;
      this.quantity[m] = q;
    };

    for (const r of idx) {
      const h = L.lineHash[r]!;
      this.lastMs = L.knownMs[r]!;
      this.lastHash = h;
      this.lastRevision = L.revision[r]!;
      const cur = current.get(h);
      if (cur >= 0 && L.revision[r]! <= L.revision[cur]!) continue; // superseded: no effect on the book
      const atMs = L.knownMs[r]!;
      const atDay = L.knownDay[r]!;
      if (this.firstActivity === null || L.orderedDay[r]! < this.firstActivity) this.firstActivity = Math.min(L.orderedDay[r]!, atDay);
      const q = L.quantity[r]!;
      const cust = L.customer[r]!;
      let f = cur >= 0 ? rowFlags[cur]! & PART_FIRST_FILL : 0;
      if (cur < 0 && cust >= 0 && !seenCustomers.has(cust)) {
        f |= PART_FIRST_FILL;
        seenCustomers.add(cust);
      }
      // Large line: far above what this customer (or, lacking history, the series) usually orders, and a large
      // share of its week's baseline as known then. Judged only on lines known before it, so the verdict never
      // changes with later data.
      const history = cust >= 0 ? byCustomer.get(cust) : undefined;
      const usual = history && history.length >= settings.largeLineMinHistory ? history : seriesSizes.length >= settings.largeLineMinHistory ? seriesSizes : undefined;
      if (usual && q > 0) {
        const base = weekValue(known.at(atMs), weekStartOf(L.requestedDay[r]!, this.weekStart));
        if (base !== undefined && q > settings.largeLineWeekShare * base && q > settings.largeLineFactor * median(usual)) f |= PART_LARGE;
      }
      const first = cur >= 0 ? rowFirst[cur]! : atDay;
      if (cur >= 0) emit(cur, -L.quantity[cur]!, rowFlags[cur]!, first, atMs, atDay);
      emit(r, q, f, first, atMs, atDay);
      current.set(h, r);
      rowFlags[r] = f;
      rowFirst[r] = first;
      if (q > 0) {
        const list = cust >= 0 ? byCustomer.get(cust) ?? [] : undefined;
        if (list) {
          list.push(q);
          if (list.length > HISTORY) list.shift();
          byCustomer.set(cust, list);
        }
        seriesSizes.push(q);
        if (seriesSizes.length > HISTORY) seriesSizes.shift();
      }
    }
  }
}

interface CacheEntry {
  readonly changeCount: number;
  readonly layoutCount: number;
  readonly walk: PartsWalk;
  readonly parts: SeriesParts;
}

const cache = new WeakMap<SeriesState, CacheEntry>();

/**
 * The parts of a series. Rebuilt only when the series changed since the last call, and then by appending the new
 * rows when they were all known after the rows already walked (the usual case: a day's records); a late record,
 * a prune or a calendar change walks the whole history again.
 */
export function seriesParts(series: SeriesState, settings: SensingSettings, weekStart: number): SeriesParts {
  const hit = cache.get(series);
  if (hit && hit.changeCount === series.changeCount && hit.walk.settings === settings && hit.walk.weekStart === weekStart) return hit.parts;
  let walk = hit && hit.layoutCount === series.layoutCount && hit.walk.settings === settings && hit.walk.weekStart === weekStart ? hit.walk : undefined;
  if (!walk || !walk.extend()) {
    walk = new PartsWalk(series, settings, weekStart);
    walk.extend();
  }
  const parts = finishParts(walk);
  cache.set(series, { changeCount: series.changeCount, layoutCount: series.layoutCount, walk, parts });
  return parts;
}

/**
 * The flags of every line row as the series' parts judge them now, with the settings and week start of its last
 * recompute; undefined when it has none (a prune compares the flags before and after; see as-of-cache.ts).
 */
export function judgedRowFlags(series: SeriesState): { readonly flags: Int32Array; readonly settings: SensingSettings; readonly weekStart: number } | undefined {
  const hit = cache.get(series);
  if (!hit) return undefined;
  seriesParts(series, hit.walk.settings, hit.walk.weekStart);
  const walk = cache.get(series)!.walk;
  return { flags: walk.flagsOfRows(series.lines.length), settings: walk.settings, weekStart: walk.weekStart };
}

/** The parts from a fresh walk of the whole history (what the incremental path must always equal). */
export function buildParts(series: SeriesState, settings: SensingSettings, weekStart: number): SeriesParts {
  const walk = new PartsWalk(series, settings, weekStart);
  walk.extend();
  return finishParts(walk);
}

function finishParts(walk: PartsWalk): SeriesParts {
  const m = walk.n;
  const { parts: shipments, firstShipDay } = walk.shipmentColumns();
  let firstActivity = walk.firstActivity;
  if (firstShipDay !== null && (firstActivity === null || firstShipDay < firstActivity)) firstActivity = firstShipDay;
  return {
    n: m,
    knownMs: walk.knownMs.subarray(0, m),
    knownDay: walk.knownDay.subarray(0, m),
    requestedDay: walk.requestedDay.subarray(0, m),
    orderedDay: walk.orderedDay.subarray(0, m),
    firstKnownDay: walk.firstKnownDay.subarray(0, m),
    customer: walk.customer.subarray(0, m),
    flags: walk.flags.subarray(0, m),
    quantity: walk.quantity.subarray(0, m),
    shipments,
    firstActivityDay: firstActivity,
  };
}
