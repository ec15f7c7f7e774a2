// Compact, exact text form of a numeric column for state snapshots. Columns of integers (days, instants, revisions,
// customer indexes, whole quantities) are delta-coded as zigzag varints, so a column in knowledge order costs a byte
// or two per row; anything else (hashes spread over 53 bits, fractional quantities) is kept as raw little-endian
// float64. Either way the bytes go out as base64 behind a one-letter mode, and decoding gives back every value bit
// for bit (−0 and non-integers always take the raw form).

/** Deltas beyond this stay exact after zigzag (2|d| + 1 < 2^53). */
const MAX_DELTA = 2 ** 52 - 1;

// Standard base64 without padding. Node's own codec does the work (a restore decodes hundreds of megabytes), into
// one scratch buffer reused by every decode (a buffer per column was most of a large restore's garbage). Its
// decoder skips characters outside the alphabet, so a text with any is short of bytes; it also takes the URL-safe
// characters, and stray bits after the last byte, both of which are refused here.

/** Raw columns are little-endian; on such a platform their bytes are copied into a Float64Array as they are. */
const LITTLE_ENDIAN = new Uint8Array(Uint16Array.of(1).buffer)[0] === 1;

let scratch = Buffer.allocUnsafe(1 << 16);

function toBase64(bytes: Uint8Array, n: number): string {
  const text = Buffer.from(bytes.buffer, bytes.byteOffset, n).toString('base64');
  let end = text.length;
  while (end > 0 && text.charCodeAt(end - 1) === 61 /* = */) end--;
  return end === text.length ? text : text.slice(0, end);
}

/** Value of a base64 character of the standard alphabet (-1 for any other). */
function sextet(c: number): number {
  if (c >= 65 && c <= 90) return c - 65;
  if (c >= 97 && c <= 122) return c - 71;
  if (c >= 48 && c <= 57) return c + 4;
  return c === 43 ? 62 : c === 47 ? 63 : -1;
}

/** Bytes of unpadded base64 text (a view valid until the next decode), undefined when the text is not base64. */
function fromBase64(text: string): Uint8Array | undefined {
  const rest = text.length % 4;
  if (rest === 1) return undefined;
  const n = Math.floor((text.length * 3) / 4);
  if (scratch.length < n) scratch = Buffer.allocUnsafe(Math.max(n, 2 * scratch.length));
  if (scratch.write(text, 0, n, 'base64') !== n || text.includes('-') || text.includes('_')) return undefined;
  // The last character of a text that does not end on a byte boundary carries 2 (rest 3) or 4 (rest 2) unused bits.
  if (rest > 0 && (sextet(text.charCodeAt(text.length - 1)) & (rest === 2 ? 15 : 3)) !== 0) return undefined;
  return scratch.subarray(0, n);
}

function isDeltaCodable(values: ArrayLike<number>): boolean {
  let prev = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    if (!Number.isInteger(v) || Object.is(v, -0)) return false;
    const d = v - prev;
    if (!(Math.abs(d) <= MAX_DELTA)) return false;
    prev = v;
  }
  return true;
}

/** Text form of a column of finite numbers. */
export function encodeColumn(values: ArrayLike<number>): string {
  const n = values.length;
  if (isDeltaCodable(values)) {
    // At most 8 bytes per value: 2·2^52 < 2^56.
    const bytes = new Uint8Array(8 * n);
    let k = 0;
    let prev = 0;
    for (let i = 0; i < n; i++) {
      const d = values[i]! - prev;
      prev = values[i]!;
      let z = d >= 0 ? 2 * d : -2 * d - 1;
      while (z >= 128) {
        bytes[k++] = (z % 128) | 128;
        z = Math.floor(z / 128);
      }
      bytes[k++] = z;
    }
    if (k < 8 * n || n === 0) return `d${toBase64(bytes, k)}`;
  }
  // Little-endian whatever the platform, so a snapshot reads the same everywhere.
  const raw = new Uint8Array(8 * n);
  const view = new DataView(raw.buffer);
  for (let i = 0; i < n; i++) view.setFloat64(8 * i, values[i]!, true);
  return `f${toBase64(raw, 8 * n)}`;
}

type Sink = number[] | Float64Array | Int32Array;

/** Decodes into the list `make` gives for the value count; undefined when the text is damaged. */
function decodeInto<A extends Sink>(text: string, make: (n: number) => A): A | undefined {
  const bytes = fromBase64(text.slice(1));
  if (bytes === undefined) return undefined;
  if (text[0] === 'd') {
    // One value ends at each byte without the continuation bit.
    let n = 0;
    for (let k = 0; k < bytes.length; k++) if ((bytes[k]! & 128) === 0) n++;
    const out = make(n);
    let i = 0;
    let prev = 0;
    let z = 0;
    let scale = 1;
    for (let k = 0; k < bytes.length; k++) {
      const b = bytes[k]!;
      z += (b & 127) * scale;
      if (b & 128) {
        scale *= 128;
        if (scale > 2 ** 56) return undefined;
        continue;
      }
      const d = z % 2 === 0 ? z / 2 : -(z + 1) / 2;
      prev += d;
      out[i++] = prev;
      z = 0;
      scale = 1;
    }
    return scale === 1 && z === 0 ? out : undefined;
  }
  if (text[0] === 'f') {
    if (bytes.length % 8 !== 0) return undefined;
    const out = make(bytes.length / 8);
    if (LITTLE_ENDIAN && out instanceof Float64Array) {
      new Uint8Array(out.buffer, out.byteOffset, bytes.length).set(bytes);
      return out;
    }
    const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.length);
    for (let k = 0; k < bytes.length; k += 8) out[k / 8] = view.getFloat64(k, true);
    return out;
  }
  return undefined;
}

/** Values of a column in text form; undefined when the text is damaged. */
export function decodeColumn(text: string): number[] | undefined {
  return decodeInto(text, (n) => new Array<number>(n));
}

/** Where a decode puts its values: a typed array of the kind asked for, of length n. */
export type ColumnAlloc = (kind: 'f64' | 'i32', n: number) => Float64Array | Int32Array;

const fresh: ColumnAlloc = (kind, n) => (kind === 'f64' ? new Float64Array(n) : new Int32Array(n));

/**
 * A column in text form straight into a typed array of its kind (no intermediate list: a restore decodes millions
 * of values); undefined when the text is damaged or holds a value that is not finite. An i32 column takes its
 * values as Int32Array.from would. `alloc` gives the arrays (a restore hands out views of one scratch buffer: an
 * array buffer per column was much of a large restore's time and garbage).
 */
export function decodeTypedColumn(text: string, kind: 'f64' | 'i32', alloc: ColumnAlloc = fresh): Float64Array | Int32Array | undefined {
  if (text[0] === 'f') {
    const values = decodeInto(text, (n) => alloc('f64', n) as Float64Array);
    if (values === undefined) return undefined;
    for (let i = 0; i < values.length; i++) if (!Number.isFinite(values[i]!)) return undefined;
    if (kind === 'f64') return values;
    const out = alloc('i32', values.length);
    out.set(values);
    return out;
  }
  return decodeInto(text, (n) => alloc(kind, n));
}
