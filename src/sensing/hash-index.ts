// A map from the state's 53-bit identity hashes (see hash.ts) to row numbers, in typed arrays with open addressing
// (linear probing). A series remembers every line, shipment and event id of its retention window; as Map and Set
// entries each key was a boxed number the garbage collector visited on every major collection (about a thousand
// per series, so 10^8 at 100k series), and restoring a state rebuilt them one allocation at a time.
//
// The indexes were also more than half of a series' memory. Their bytes count as the heap's external memory, and
// V8 starts a full collection each time that grows by a fixed step, so a restore of 100k series ran one full
// collection per few thousand series, each over the whole heap: the restore time grew faster than the series
// count. An index used as a set (event ids, shipment ids) therefore keeps no values, tables are sized to the keys
// (not to powers of two) and are filled to 70 % before they grow.

const EMPTY = NaN;
/** Load at which a table grows, and the load a table sized for a known count starts at (room for new keys). */
const MAX_LOAD = 0.7;
const START_LOAD = 0.6;
const MIN_SLOTS = 8;

export interface HashIndexShape {
  /** Keys expected (the table is sized for them at START_LOAD). */
  readonly capacity?: number;
  /** False for a set: `add`/`has` only, no value per key (a third less memory). */
  readonly values?: boolean;
}

export class HashIndex {
  private keys: Float64Array;
  private vals: Int32Array | undefined;
  private count = 0;

  constructor(shape: HashIndexShape = {}, block?: { readonly buffer: ArrayBuffer; readonly offset: number }) {
    const size = HashIndex.slotsFor(shape.capacity ?? 0);
    const withValues = shape.values ?? true;
    const buffer = block?.buffer ?? new ArrayBuffer(HashIndex.bytesFor(size, withValues));
    const at = block?.offset ?? 0;
    // Keys and values in one buffer (and a series' indexes in one, see `together`): each buffer is an allocation
    // and an object the collector tracks.
    this.keys = new Float64Array(buffer, at, size).fill(EMPTY);
    this.vals = withValues ? new Int32Array(buffer, at + 8 * size, size) : undefined;
  }

  private static slotsFor(capacity: number): number {
    return Math.max(MIN_SLOTS, Math.ceil(capacity / START_LOAD));
  }

  /** Bytes of a table of `size` slots, rounded up to 8 so the next table in a shared buffer stays aligned. */
  private static bytesFor(size: number, withValues: boolean): number {
    return withValues ? 8 * size + 4 * size + ((4 * size) % 8) : 8 * size;
  }

  /** Indexes of the given shapes sharing one buffer (one that grows moves to a buffer of its own). */
  static together(shapes: readonly HashIndexShape[]): HashIndex[] {
    const bytes = shapes.map((s) => HashIndex.bytesFor(HashIndex.slotsFor(s.capacity ?? 0), s.values ?? true));
    const buffer = new ArrayBuffer(bytes.reduce((t, n) => t + n, 0));
    let offset = 0;
    return shapes.map((shape, k) => {
      const index = new HashIndex(shape, { buffer, offset });
      offset += bytes[k]!;
      return index;
    });
  }

  get size(): number {
    return this.count;
  }

  /** Bytes the index holds (its keys and values). */
  get byteLength(): number {
    return this.keys.byteLength + (this.vals?.byteLength ?? 0);
  }

  /** The slot holding `key`, or the empty slot where it would go. */
  private slot(key: number): number {
    // Both halves of the hash take part: the low 32 bits alone would do, but nothing here relies on that. The
    // mixed 32 bits are scaled to the table's size (any size, not only powers of two).
    const hi = Math.floor(key / 4_294_967_296) | 0;
    const mixed = Math.imul((key >>> 0) ^ Math.imul(hi, 0x85ebca6b), 0x9e3779b1) >>> 0;
    const keys = this.keys;
    const size = keys.length;
    let i = Math.floor((mixed * size) / 4_294_967_296);
    for (;;) {
      const k = keys[i]!;
      if (k === key || k !== k) return i;
      i = i + 1 === size ? 0 : i + 1;
    }
  }

  /** The value stored for `key`, −1 when absent (0 for a key of a set). */
  get(key: number): number {
    const i = this.slot(key);
    return this.keys[i] === key ? (this.vals ? this.vals[i]! : 0) : -1;
  }

  has(key: number): boolean {
    return this.keys[this.slot(key)] === key;
  }

  /** Stores `value` (a non-negative int32) for `key`, replacing any earlier one. */
  set(key: number, value: number): void {
    if (!this.vals && value !== 0) throw new RangeError('this HashIndex is a set: it keeps no values');
    this.put(key, value);
  }

  /** Set semantics: remembers `key` (value 0). */
  add(key: number): void {
    if (!this.has(key)) this.put(key, 0);
  }

  private put(key: number, value: number): void {
    if (!Number.isFinite(key)) throw new RangeError(`HashIndex keys are finite numbers, got ${key}`);
    let i = this.slot(key);
    if (this.keys[i] !== key) {
      if (this.count + 1 > MAX_LOAD * this.keys.length) {
        this.grow();
        i = this.slot(key);
      }
      this.keys[i] = key;
      this.count++;
    }
    if (this.vals) this.vals[i] = value;
  }

  clear(): void {
    if (this.count === 0) return; // nothing is ever removed alone, so no key is stored
    this.keys.fill(EMPTY);
    this.count = 0;
  }

  private grow(): void {
    const oldKeys = this.keys;
    const oldValues = this.vals;
    const size = oldKeys.length * 2;
    const buffer = new ArrayBuffer(HashIndex.bytesFor(size, oldValues !== undefined));
    this.keys = new Float64Array(buffer, 0, size).fill(EMPTY);
    this.vals = oldValues ? new Int32Array(buffer, 8 * size, size) : undefined;
    for (let j = 0; j < oldKeys.length; j++) {
      const k = oldKeys[j]!;
      if (k !== k) continue;
      const i = this.slot(k);
      this.keys[i] = k;
      if (this.vals) this.vals[i] = oldValues![j]!;
    }
  }
}
