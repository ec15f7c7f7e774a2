// Householder QR least squares for tall, narrow systems (many rows, a handful of columns), column-major so each
// pass runs down one contiguous Float64Array. Backward stable: the solution's error grows with the condition
// number of A, not with its square as with the normal equations. Golub & Van Loan, Matrix Computations, §5.3
// (recalled from memory).

import { NearcastError } from '../errors.ts';

/** Relative size of a diagonal entry of R below which the design is treated as rank-deficient. */
const RANK_TOLERANCE = 1e-12;

/**
 * Householder QR of the column-major m×q matrix A (overwritten), applied to b (overwritten); returns the
 * upper-triangular R (row-major q×q) and the least-squares solution of R x = (Qᵀb)[0..q). Throws
 * NEARCAST_SOLVER_SINGULAR naming the first column (by `label`) that depends on the ones before it.
 */
export function householderLeastSquares(
  A: Float64Array[],
  b: Float64Array,
  q: number,
  label: (k: number) => string,
): { R: Float64Array; solution: Float64Array } {
  const rows = b.length;
  const R = new Float64Array(q * q);
  let maxDiag = 0;
  for (let k = 0; k < q; k++) {
    const ak = A[k]!;
    let ss = 0;
    for (let i = k; i < rows; i++) ss += ak[i]! * ak[i]!;
    let alpha = Math.sqrt(ss);
    if (!(alpha > 0 && Number.isFinite(ss) && ss > 1e-290)) {
      // Rescaled norm, only when the plain sum of squares under- or overflowed.
      let amax = 0;
      for (let i = k; i < rows; i++) amax = Math.max(amax, Math.abs(ak[i]!));
      ss = 0;
      if (amax > 0) for (let i = k; i < rows; i++) ss += (ak[i]! / amax) ** 2;
      alpha = amax * Math.sqrt(ss);
    }
    if (alpha > 0) {
      if (ak[k]! > 0) alpha = -alpha;
      // v = a − α e₁, stored in place; H = I − 2vvᵀ/vᵀv, with vᵀv = 2α(α − aₖ).
      ak[k] = ak[k]! - alpha;
      const vtv = -alpha * ak[k]!;
      if (vtv !== 0) {
        for (let l = k + 1; l < q; l++) {
          const al = A[l]!;
          let dot = 0;
          for (let i = k; i < rows; i++) dot += ak[i]! * al[i]!;
          const f = dot / vtv;
          for (let i = k; i < rows; i++) al[i] = al[i]! - f * ak[i]!;
        }
        let dot = 0;
        for (let i = k; i < rows; i++) dot += ak[i]! * b[i]!;
        const f = dot / vtv;
        for (let i = k; i < rows; i++) b[i] = b[i]! - f * ak[i]!;
      }
    }
    R[k * q + k] = alpha;
    for (let l = k + 1; l < q; l++) R[k * q + l] = A[l]![k]!;
    maxDiag = Math.max(maxDiag, Math.abs(alpha));
  }
  for (let k = 0; k < q; k++) {
    if (!(Math.abs(R[k * q + k]!) > RANK_TOLERANCE * maxDiag)) {
      throw new NearcastError('NEARCAST_SOLVER_SINGULAR', [
        `${label(k)} is a linear combination of the columns before it over the weighted rows`,
      ]);
    }
  }
  const x = new Float64Array(q);
  for (let k = q - 1; k >= 0; k--) {
    let s = b[k]!;
    for (let l = k + 1; l < q; l++) s -= R[k * q + l]! * x[l]!;
    x[k] = s / R[k * q + k]!;
  }
  return { R, solution: x };
}

/** Inverse of the row-major upper-triangular q×q matrix R (row-major result). */
export function invertUpperTriangular(R: Float64Array, q: number): Float64Array {
  const inv = new Float64Array(q * q);
  for (let col = 0; col < q; col++) {
    for (let k = q - 1; k >= 0; k--) {
      let s = k === col ? 1 : 0;
      for (let l = k + 1; l < q; l++) s -= R[k * q + l]! * inv[l * q + col]!;
      inv[k * q + col] = s / R[k * q + k]!;
    }
  }
  return inv;
}
