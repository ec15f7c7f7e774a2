// The order that sorts values ascending, ties (−0 and +0 among them) in index order: the order a comparison sort by
// (value, index) gives, found instead by a stable least-significant-digit radix sort of the values' IEEE 754 bit
// patterns, each turned into an unsigned key that orders like the number (negative: all bits flipped; otherwise the
// sign bit set). The winsorising bounds of every lead's fit sort about a hundred thousand training ratios per close;
// a comparison sort through a callback took most of that time.

/** Below this many values a comparison sort is as quick and allocates less. */
const RADIX_FROM = 256;
const DIGIT_BITS = 16;
const BUCKETS = 1 << DIGIT_BITS;

const scratch = new Float64Array(1);
const scratchBits = new Uint32Array(scratch.buffer);

/**
 * The indices `candidates` (ascending) reordered so that `values` at them ascend, equal values keeping index order.
 * Values must not be NaN.
 */
export function ascendingOrder(values: ArrayLike<number>, candidates: Int32Array): Int32Array {
  const n = candidates.length;
  if (n < RADIX_FROM) {
    return Int32Array.from(candidates).sort((a, b) => {
      const va = values[a]!;
      const vb = values[b]!;
      return va < vb ? -1 : va > vb ? 1 : a - b;
    });
  }
  let idx = Int32Array.from(candidates);
  let lo = new Uint32Array(n);
  let hi = new Uint32Array(n);
  for (let k = 0; k < n; k++) {
    scratch[0] = values[idx[k]!]! + 0; // −0 + 0 is +0: both zeros get one key
    const l = scratchBits[0]!;
    const h = scratchBits[1]!;
    if (h & 0x80000000) {
      lo[k] = ~l >>> 0;
      hi[k] = ~h >>> 0;
    } else {
      lo[k] = l;
      hi[k] = (h | 0x80000000) >>> 0;
    }
  }
  let idx2 = new Int32Array(n);
  let lo2 = new Uint32Array(n);
  let hi2 = new Uint32Array(n);
  const count = new Uint32Array(BUCKETS);
  for (let pass = 0; pass < 4; pass++) {
    const word = pass < 2 ? lo : hi;
    const shift = (pass & 1) * DIGIT_BITS;
    count.fill(0);
    for (let k = 0; k < n; k++) count[(word[k]! >>> shift) & (BUCKETS - 1)]!++;
    // A digit all keys share moves nothing (the high digits of ratios near 1, for one).
    if (count[(word[0]! >>> shift) & (BUCKETS - 1)] === n) continue;
    let sum = 0;
    for (let b = 0; b < BUCKETS; b++) {
      const c = count[b]!;
      count[b] = sum;
      sum += c;
    }
    for (let k = 0; k < n; k++) {
      const at = count[(word[k]! >>> shift) & (BUCKETS - 1)]!++;
      idx2[at] = idx[k]!;
      lo2[at] = lo[k]!;
      hi2[at] = hi[k]!;
    }
    [idx, idx2] = [idx2, idx];
    [lo, lo2] = [lo2, lo];
    [hi, hi2] = [hi2, hi];
  }
  return idx;
}
