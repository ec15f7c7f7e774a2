import { weekStartOf } from '../calendar/weeks.ts';
import { weekValue } from './baseline-lookup.ts';
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

const cache = new WeakMap<SeriesState, { changeCount: number; settings: SensingSettings; weekStart: number; parts: SeriesParts }>();

/** The parts of a series, rebuilt only when the series changed since the last call. */
export function seriesParts(series: SeriesState, settings: SensingSettings, weekStart: number): SeriesParts {
  const hit = cache.get(series);
  if (hit && hit.changeCount === series.changeCount && hit.settings === settings && hit.weekStart === weekStart) return hit.parts;
  const parts = buildParts(series, settings, weekStart);
  cache.set(series, { changeCount: series.changeCount, settings, weekStart, parts });
  return parts;
}

/**
 * The highest version known by each instant asked for, asked in non-decreasing instants (lines in knowledge
 * order): the versions are walked once in order of knowledge instead of scanned for every line.
 */
class KnownVersion {
  private readonly byKnown: BaselineVersionEntry[];
  private next = 0;
  private best: BaselineVersionEntry | undefined;

  constructor(baselines: readonly BaselineVersionEntry[]) {
    this.byKnown = [...baselines].sort((a, b) => (a.knownMs < b.knownMs ? -1 : a.knownMs > b.knownMs ? 1 : 0));
  }

  at(knownMs: number): BaselineVersionEntry | undefined {
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

function buildParts(series: SeriesState, settings: SensingSettings, weekStart: number): SeriesParts {
  const L = series.lines.cols;
  const n = series.lines.length;
  const idx: number[] = [];
  for (let i = 0; i < n; i++) idx.push(i);
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

  // Every kept row emits its own part; only a row that outranks an earlier revision of its line also withdraws
  // that one, and such a row's revision exceeds the lowest revision present: that bounds the parts exactly enough.
  let minRevision = Infinity;
  for (let i = 0; i < n; i++) if (L.revision[i]! < minRevision) minRevision = L.revision[i]!;
  let withdrawals = 0;
  for (let i = 0; i < n; i++) if (L.revision[i]! > minRevision) withdrawals++;
  const cap = n + withdrawals + 1;
  const knownMs = new Float64Array(cap);
  const knownDay = new Int32Array(cap);
  const requestedDay = new Int32Array(cap);
  const orderedDay = new Int32Array(cap);
  const firstKnownDay = new Int32Array(cap);
  const customer = new Int32Array(cap);
  const flags = new Int32Array(cap);
  const quantity = new Float64Array(cap);
  let m = 0;

  // Per line: its current row, flags and first knowledge day. Per customer: recent line sizes known so far.
  // (The current row's flags and first knowledge day are kept by row, so a line costs no object.)
  const current = new Map<number, number>();
  const rowFlags = new Int32Array(n);
  const rowFirst = new Int32Array(n);
  const byCustomer = new Map<number, number[]>();
  const seriesSizes: number[] = [];
  const seenCustomers = new Set<number>();
  let firstActivity: number | null = null;
  const known = new KnownVersion(series.baselines);

  const emit = (row: number, q: number, f: number, first: number, atMs: number, atDay: number) => {
    if (q === 0) return;
    knownMs[m] = atMs;
    knownDay[m] = atDay;
    requestedDay[m] = L.requestedDay[row]!;
    orderedDay[m] = L.orderedDay[row]!;
    firstKnownDay[m] = first;
    customer[m] = L.customer[row]!;
    flags[m] = f;
    quantity[m] = q;
    m++;
  };

  for (const r of idx) {
    const h = L.lineHash[r]!;
    const cur = current.get(h);
    if (cur !== undefined && L.revision[r]! <= L.revision[cur]!) continue; // superseded: no effect on the book
    const atMs = L.knownMs[r]!;
    const atDay = L.knownDay[r]!;
    if (firstActivity === null || L.orderedDay[r]! < firstActivity) firstActivity = Math.min(L.orderedDay[r]!, atDay);
    const q = L.quantity[r]!;
    const cust = L.customer[r]!;
    let f = cur !== undefined ? rowFlags[cur]! & PART_FIRST_FILL : 0;
    if (cur === undefined && cust >= 0 && !seenCustomers.has(cust)) {
      f |= PART_FIRST_FILL;
      seenCustomers.add(cust);
    }
    // Large line: far above what this customer (or, lacking history, the series) usually orders, and a large
    // share of its week's baseline as known then. Judged only on lines known before it, so the verdict never
    // changes with later data.
    const history = cust >= 0 ? byCustomer.get(cust) : undefined;
    const usual = history && history.length >= settings.largeLineMinHistory ? history : seriesSizes.length >= settings.largeLineMinHistory ? seriesSizes : undefined;
    if (usual && q > 0) {
      const base = weekValue(known.at(atMs), weekStartOf(L.requestedDay[r]!, weekStart));
      if (base !== undefined && q > settings.largeLineWeekShare * base && q > settings.largeLineFactor * median(usual)) f |= PART_LARGE;
    }
    const first = cur !== undefined ? rowFirst[cur]! : atDay;
    if (cur !== undefined) emit(cur, -L.quantity[cur]!, rowFlags[cur]!, first, atMs, atDay);
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

  const S = series.shipments.cols;
  const sn = series.shipments.length;
  const sIdx = Array.from({ length: sn }, (_, i) => i);
  sIdx.sort((a, b) => {
    const ka = S.knownMs[a]!;
    const kb = S.knownMs[b]!;
    if (ka !== kb) return ka < kb ? -1 : 1;
    const ha = S.shipmentHash[a]!;
    const hb = S.shipmentHash[b]!;
    return ha < hb ? -1 : ha > hb ? 1 : 0;
  });
  const sh = {
    n: sn,
    knownMs: new Float64Array(sn),
    knownDay: new Int32Array(sn),
    shipDay: new Int32Array(sn),
    quantity: new Float64Array(sn),
    lagDays: new Int32Array(sn),
  };
  sIdx.forEach((r, k) => {
    sh.knownMs[k] = S.knownMs[r]!;
    sh.knownDay[k] = S.knownDay[r]!;
    sh.shipDay[k] = S.shipDay[r]!;
    sh.quantity[k] = S.quantity[r]!;
    const lineRow = S.lineHash[r]! >= 0 ? current.get(S.lineHash[r]!) : undefined;
    const req = lineRow === undefined ? undefined : L.requestedDay[lineRow]!;
    sh.lagDays[k] = req === undefined ? LAG_UNKNOWN : S.shipDay[r]! - req;
    if (firstActivity === null || S.shipDay[r]! < firstActivity) firstActivity = S.shipDay[r]!;
  });

  return {
    n: m,
    knownMs: knownMs.subarray(0, m),
    knownDay: knownDay.subarray(0, m),
    requestedDay: requestedDay.subarray(0, m),
    orderedDay: orderedDay.subarray(0, m),
    firstKnownDay: firstKnownDay.subarray(0, m),
    customer: customer.subarray(0, m),
    flags: flags.subarray(0, m),
    quantity: quantity.subarray(0, m),
    shipments: sh,
    firstActivityDay: firstActivity,
  };
}
