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

  /**
   * Every column in one array buffer (the f64 columns first, so each view stays aligned): a buffer per column made
   * a series cost dozens of buffers, each one an allocation and an object the collector tracks.
   */
  private static allocate<S extends ColumnSpec>(spec: S, capacity: number): Columns<S> {
    const names = Object.keys(spec);
    const f64Columns = names.filter((name) => spec[name] === 'f64').length;
    const buffer = new ArrayBuffer(capacity * (8 * f64Columns + 4 * (names.length - f64Columns)));
    // Made in the spec's key order, which snapshots and toJSON follow.
    const out: Record<string, Float64Array | Int32Array> = {};
    let f64At = 0;
    let i32At = 8 * capacity * f64Columns;
    for (const name of names) {
      if (spec[name] === 'f64') {
        out[name] = new Float64Array(buffer, f64At, capacity);
        f64At += 8 * capacity;
      } else {
        out[name] = new Int32Array(buffer, i32At, capacity);
        i32At += 4 * capacity;
      }
    }
    return out as Columns<S>;
  }

  get capacity(): number {
    // Read on every push: from a column's length, not a list of the columns made each time.
    for (const name in this.cols) return (this.cols[name] as Float64Array | Int32Array).length;
    return 0;
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
   * A table of the given columns' values (copied into one buffer, so the columns may be views of scratch space):
   * each must be of its spec's kind and all of one length. Columns named in `unsaved` are made, every row holding
   * the value given. Undefined when a column is missing.
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
    const t = new Table(spec, length);
    for (const name of Object.keys(spec)) {
      const fill = (unsaved as Record<string, number | undefined>)[name];
      const col = t.cols[name] as Float64Array | Int32Array;
      if (fill === undefined) col.set(given[name]!);
      else col.fill(fill);
    }
    t.length = length;
    return t;
  }
}
