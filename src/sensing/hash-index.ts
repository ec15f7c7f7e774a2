// A map from the state's 53-bit identity hashes (see hash.ts) to row numbers, in two typed arrays with open
// addressing. A series remembers every line, shipment and event id of its retention window; as Map and Set entries
// each key was a boxed number the garbage collector visited on every major collection (about a thousand per series,
// so 10^8 at 100k series), and restoring a state rebuilt them one allocation at a time. Here a series' index is two
// buffers whatever its size.

const EMPTY = NaN;

export class HashIndex {
  private keys: Float64Array;
  private values: Int32Array;
  private mask: number;
  private count = 0;

  constructor(capacity = 8, block?: { readonly buffer: ArrayBuffer; readonly offset: number }) {
    const size = HashIndex.slotsFor(capacity);
    const buffer = block?.buffer ?? new ArrayBuffer(12 * size);
    const at = block?.offset ?? 0;
    // Keys and values in one buffer (and a series' indexes in one, see `together`): each buffer is an allocation
    // and an object the collector tracks, which dominated restoring 100k series.
    this.keys = new Float64Array(buffer, at, size).fill(EMPTY);
    this.values = new Int32Array(buffer, at + 8 * size, size);
    this.mask = size - 1;
  }

  private static slotsFor(capacity: number): number {
    let size = 8;
    while (size < capacity * 2) size *= 2;
    return size;
  }

  /** Indexes for the given capacities sharing one buffer (one that grows moves to a buffer of its own). */
  static together(capacities: readonly number[]): HashIndex[] {
    const sizes = capacities.map((c) => HashIndex.slotsFor(c));
    const buffer = new ArrayBuffer(12 * sizes.reduce((t, n) => t + n, 0));
    let offset = 0;
    return capacities.map((c, k) => {
      const index = new HashIndex(c, { buffer, offset });
      offset += 12 * sizes[k]!;
      return index;
    });
  }

  get size(): number {
    return this.count;
  }

  /** The slot holding `key`, or the empty slot where it would go. */
  private slot(key: number): number {
    // Both halves of the hash take part: the low 32 bits alone would do, but nothing here relies on that.
    const hi = Math.floor(key / 4_294_967_296) | 0;
    let i = Math.imul((key >>> 0) ^ Math.imul(hi, 0x85ebca6b), 0x9e3779b1) >>> 0;
    const keys = this.keys;
    for (;;) {
      i &= this.mask;
      const k = keys[i]!;
      if (k === key || k !== k) return i;
      i++;
    }
  }

  /** The value stored for `key`, −1 when absent. */
  get(key: number): number {
    const i = this.slot(key);
    return this.keys[i] === key ? this.values[i]! : -1;
  }

  has(key: number): boolean {
    return this.keys[this.slot(key)] === key;
  }

  /** Stores `value` (a non-negative int32) for `key`, replacing any earlier one. */
  set(key: number, value: number): void {
    if (!Number.isFinite(key)) throw new RangeError(`HashIndex keys are finite numbers, got ${key}`);
    let i = this.slot(key);
    if (this.keys[i] !== key) {
      if ((this.count + 1) * 2 > this.keys.length) {
        this.grow();
        i = this.slot(key);
      }
      this.keys[i] = key;
      this.count++;
    }
    this.values[i] = value;
  }

  /** Set semantics: remembers `key` (value 0). */
  add(key: number): void {
    if (!this.has(key)) this.set(key, 0);
  }

  clear(): void {
    if (this.count === 0) return; // nothing is ever removed alone, so no key is stored
    this.keys.fill(EMPTY);
    this.count = 0;
  }

  private grow(): void {
    const oldKeys = this.keys;
    const oldValues = this.values;
    const size = oldKeys.length * 2;
    const buffer = new ArrayBuffer(12 * size);
    this.keys = new Float64Array(buffer, 0, size).fill(EMPTY);
    this.values = new Int32Array(buffer, 8 * size, size);
    this.mask = this.keys.length - 1;
    for (let j = 0; j < oldKeys.length; j++) {
      const k = oldKeys[j]!;
      if (k !== k) continue;
      const i = this.slot(k);
      this.keys[i] = k;
      this.values[i] = oldValues[j]!;
    }
  }
}
