// Tabular (Page-type) two-sided CUSUM, Page (1954); the form of NIST/SEMATECH e-Handbook 6.3.2.3 and
// Montgomery & Runger §16-10. Works in whatever units its inputs are in: data units with k and h in data units, or
// standardised residuals (target 0) with k and h in σ units, as the monitor uses it.

export interface CusumState {
  /** Upper and lower sums, both ≥ 0. */
  readonly hi: number;
  readonly lo: number;
  /** Consecutive steps each sum has been above zero (the textbook's N+ and N− run counters). */
  readonly nHi: number;
  readonly nLo: number;
}

export const CUSUM_START: CusumState = Object.freeze({ hi: 0, lo: 0, nHi: 0, nLo: 0 });

export interface CusumStep {
  readonly state: CusumState;
  readonly signal: 'up' | 'down' | null;
}

/** One observation: S_hi = max(0, S_hi + (x − target) − k), S_lo = max(0, S_lo + (target − x) − k); signal above h. */
export function cusumStep(state: CusumState, x: number, target: number, k: number, h: number): CusumStep {
  const hi = Math.max(0, state.hi + (x - target) - k);
  const lo = Math.max(0, state.lo + (target - x) - k);
  const next: CusumState = { hi, lo, nHi: hi > 0 ? state.nHi + 1 : 0, nLo: lo > 0 ? state.nLo + 1 : 0 };
  // Both sides cannot exceed h on one step unless h < k; the larger one wins then.
  const signal = hi > h && hi >= lo ? 'up' : lo > h ? 'down' : null;
  return { state: next, signal };
}

export interface CusumRow extends CusumState {
  readonly signal: 'up' | 'down' | null;
}

/** The whole table for a run of observations, without reset after a signal (as the reference tables print it). */
export function tabularCusum(xs: readonly number[], target: number, k: number, h: number): CusumRow[] {
  const rows: CusumRow[] = [];
  let state = CUSUM_START;
  for (const x of xs) {
    const step = cusumStep(state, x, target, k, h);
    state = step.state;
    rows.push({ ...state, signal: step.signal });
  }
  return rows;
}

/**
 * The mean of the observations since the signalling sum last left zero, in the sums' own units: target + k + S/N
 * (Montgomery, "Introduction to Statistical Quality Control", §9.1.2, recalled from memory). The monitor uses the
 * ratio form over the same run to re-centre after a signal.
 */
export function cusumShiftEstimate(state: CusumState, target: number, k: number, side: 'up' | 'down'): number | null {
  if (side === 'up') return state.nHi > 0 ? target + k + state.hi / state.nHi : null;
  return state.nLo > 0 ? target - k - state.lo / state.nLo : null;
}
