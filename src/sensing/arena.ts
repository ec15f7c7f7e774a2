// A recompute at 10k series needs a few hundred MB of short-lived typed arrays (one frame per series, the training
// rows of each lead). Allocated one by one, every array of more than a few dozen bytes gets its own off-heap
// backing store, and V8 answers that much fresh external memory with full collections of the whole heap, several
// per close. An arena hands out zeroed views into a few large blocks that it keeps from one recompute to the next:
// after the first close of a location nothing of that size is allocated again.

/** Where a recompute takes its zeroed scratch arrays from. */
export interface ScratchArrays {
  f64(n: number): Float64Array;
  u8(n: number): Uint8Array;
  i32(n: number): Int32Array;
}

/** Fresh arrays every time: for callers that keep what they are given (tests, one-off recomputes). */
export const FRESH_ARRAYS: ScratchArrays = {
  f64: (n) => new Float64Array(n),
  u8: (n) => new Uint8Array(n),
  i32: (n) => new Int32Array(n),
};

const DEFAULT_BLOCK_BYTES = 8 << 20;

/**
 * A bump allocator over reusable blocks. Everything handed out lives until `reset`, which takes it all back: a
 * caller must not read an array from before the reset (the owner of an arena resets it at the start of its own
 * recompute, and nothing it returns may be a view into it).
 */
export class Arena implements ScratchArrays {
  private readonly blocks: ArrayBuffer[] = [];
  /** Index of the block being filled, and bytes used in it. */
  private block = 0;
  private used = 0;

  constructor(private readonly blockBytes = DEFAULT_BLOCK_BYTES) {}

  /** Bytes the arena keeps (its blocks). */
  get retainedBytes(): number {
    return this.blocks.reduce((sum, b) => sum + b.byteLength, 0);
  }

  /** Takes back every array handed out and zeroes what was used, for the next recompute. */
  reset(): void {
    for (let b = 0; b < this.blocks.length && b <= this.block; b++) {
      new Uint8Array(this.blocks[b]!, 0, b < this.block ? this.blocks[b]!.byteLength : this.used).fill(0);
    }
    this.block = 0;
    this.used = 0;
  }

  f64(n: number): Float64Array {
    const [buffer, offset] = this.take(n * 8);
    return new Float64Array(buffer, offset, n);
  }

  u8(n: number): Uint8Array {
    const [buffer, offset] = this.take(n);
    return new Uint8Array(buffer, offset, n);
  }

  i32(n: number): Int32Array {
    const [buffer, offset] = this.take(n * 4);
    return new Int32Array(buffer, offset, n);
  }

  private take(bytes: number): [ArrayBuffer, number] {
    // Arrays larger than a block are not worth pooling: few per recompute, and they would pin a block each.
    if (bytes > this.blockBytes) return [new ArrayBuffer(bytes), 0];
    // 8-byte alignment for every view (Float64Array needs it).
    let offset = (this.used + 7) & ~7;
    if (this.blocks.length === 0 || offset + bytes > this.blocks[this.block]!.byteLength) {
      if (this.blocks.length > 0) this.block++;
      if (this.block === this.blocks.length) this.blocks.push(new ArrayBuffer(this.blockBytes));
      offset = 0;
    }
    this.used = offset + bytes;
    return [this.blocks[this.block]!, offset];
  }
}
