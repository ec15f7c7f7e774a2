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

  constructor(spec: S, capacity = 8, cols?: Columns<S>) {
    this.spec = spec;
    this.cols = cols ?? Table.allocate(spec, capacity);
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
   * A table over the given columns as they are (not copied): each must be of its spec's kind and all of one length.
   * Columns named in `unsaved` are made, every row holding the value given. Undefined when a column is missing.
   */
  static fromColumns<S extends ColumnSpec>(spec: S, given: Readonly<Record<string, Float64Array | Int32Array | undefined>>, unsaved: Partial<Record<keyof S & string, number>> = {}): Table<S> | undefined {
    let n = -1;
    for (const [name, kind] of Object.entries(spec)) {
      if (name in unsaved) continue;
      const col = given[name];
      if (col === undefined || (kind === 'f64') !== col instanceof Float64Array || (kind === 'i32') !== col instanceof Int32Array) return undefined;
      if (n >= 0 && col.length !== n) return undefined;
      n = col.length;
    }
    const length = Math.max(0, n);
    const cols: Record<string, Float64Array | Int32Array> = {};
    for (const [name, kind] of Object.entries(spec)) {
      const fill = (unsaved as Record<string, number | undefined>)[name];
      cols[name] = fill === undefined ? given[name]! : (kind === 'f64' ? new Float64Array(length) : new Int32Array(length)).fill(fill);
    }
    const t = new Table(spec, 0, cols as Columns<S>);
    t.length = length;
    return t;
  }
}
