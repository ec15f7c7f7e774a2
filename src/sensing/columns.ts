// Growable typed columns: one table per record kind, one typed array per field, so a series with thousands of
// records costs a few dozen bytes per record and scans without chasing pointers.

export type ColumnKind = 'f64' | 'i32';
export type ColumnSpec = Readonly<Record<string, ColumnKind>>;
type ArrayOf<K extends ColumnKind> = K extends 'f64' ? Float64Array : Int32Array;
export type Columns<S extends ColumnSpec> = { [K in keyof S]: ArrayOf<S[K]> };

export class Table<S extends ColumnSpec> {
  readonly spec: S;
  length = 0;
  cols: Columns<S>;

  constructor(spec: S, capacity = 8) {
    this.spec = spec;
    this.cols = Table.allocate(spec, capacity);
  }

  private static allocate<S extends ColumnSpec>(spec: S, capacity: number): Columns<S> {
    const out: Record<string, Float64Array | Int32Array> = {};
    for (const [name, kind] of Object.entries(spec)) out[name] = kind === 'f64' ? new Float64Array(capacity) : new Int32Array(capacity);
    return out as Columns<S>;
  }

  get capacity(): number {
    const first = Object.values(this.cols)[0] as Float64Array | Int32Array | undefined;
    return first ? first.length : 0;
  }

  /** Appends a row and returns its index. */
  push(row: { [K in keyof S]: number }): number {
    if (this.length === this.capacity) this.grow(Math.max(8, this.capacity * 2));
    const i = this.length++;
    for (const name in this.spec) (this.cols[name] as Float64Array | Int32Array)[i] = row[name];
    return i;
  }

  private grow(capacity: number): void {
    const next = Table.allocate(this.spec, capacity);
    for (const name in this.spec) (next[name] as Float64Array | Int32Array).set((this.cols[name] as Float64Array | Int32Array).subarray(0, this.length));
    this.cols = next;
  }

  /** Keeps the rows for which `keep(i)` is true, in order; returns the number removed. */
  filter(keep: (i: number) => boolean): number {
    let w = 0;
    for (let r = 0; r < this.length; r++) {
      if (!keep(r)) continue;
      if (w !== r) for (const name in this.spec) (this.cols[name] as Float64Array | Int32Array)[w] = (this.cols[name] as Float64Array | Int32Array)[r]!;
      w++;
    }
    const removed = this.length - w;
    this.length = w;
    if (this.capacity > 64 && w < this.capacity / 4) this.grow(Math.max(8, w * 2));
    return removed;
  }

  /** Reorders rows by a permutation (`order[k]` = old index of the new row k). */
  permute(order: ArrayLike<number>): void {
    const next = Table.allocate(this.spec, Math.max(8, this.capacity));
    for (const name in this.spec) {
      const src = this.cols[name] as Float64Array | Int32Array;
      const dst = next[name] as Float64Array | Int32Array;
      for (let k = 0; k < this.length; k++) dst[k] = src[order[k]!]!;
    }
    this.cols = next;
  }

  /** Column values of the live rows, as plain arrays for a JSON snapshot. */
  toJSON(): Record<string, number[]> {
    const out: Record<string, number[]> = {};
    for (const name in this.spec) out[name] = Array.from((this.cols[name] as Float64Array | Int32Array).subarray(0, this.length));
    return out;
  }

  /**
   * Rebuilds a table from `toJSON()` output; returns undefined when a column is missing or lengths differ. Columns
   * named in `unsaved` are not read: every row gets the value given (an index the caller rebuilds after).
   */
  static fromJSON<S extends ColumnSpec>(spec: S, data: unknown, unsaved: Partial<Record<keyof S & string, number>> = {}): Table<S> | undefined {
    if (data === null || typeof data !== 'object') return undefined;
    const rec = data as Record<string, unknown>;
    let n = -1;
    for (const name of Object.keys(spec)) {
      if (name in unsaved) continue;
      const col = rec[name];
      if (!Array.isArray(col) || !col.every((v) => typeof v === 'number' && Number.isFinite(v))) return undefined;
      if (n >= 0 && col.length !== n) return undefined;
      n = col.length;
    }
    const length = Math.max(0, n);
    const t = new Table(spec, Math.max(8, length));
    for (const name of Object.keys(spec)) {
      const col = t.cols[name] as Float64Array | Int32Array;
      const fill = (unsaved as Record<string, number | undefined>)[name];
      if (fill === undefined) col.set(rec[name] as number[]);
      else col.fill(fill, 0, length);
    }
    t.length = length;
    return t;
  }
}
