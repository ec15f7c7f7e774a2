// Tracking signals on forecast errors e = actual − forecast (positive = the forecast ran low).

export interface TriggState {
  /** Smoothed error E_t and smoothed absolute error M_t. */
  readonly e: number;
  readonly m: number;
  /** Periods since the last reset. */
  readonly periods: number;
}

/** Start after a reset: no smoothed error, and M at the mean absolute error expected of an unbiased forecast. */
export function triggStart(expectedAbsError: number): TriggState {
  return { e: 0, m: Math.max(0, expectedAbsError), periods: 0 };
}

/** Trigg (1964): E_t = βe_t + (1 − β)E_{t−1}, M_t = β|e_t| + (1 − β)M_{t−1}. */
export function triggStep(state: TriggState, error: number, beta: number): TriggState {
  return {
    e: beta * error + (1 - beta) * state.e,
    m: beta * Math.abs(error) + (1 - beta) * state.m,
    periods: state.periods + 1,
  };
}

/** T_t = E_t / M_t, always within [−1, 1]; 0 before any error has been seen. */
export function triggSignal(state: TriggState): number {
  if (state.m <= 0) return 0;
  return Math.max(-1, Math.min(1, state.e / state.m));
}

export interface CumulativeSignalRow {
  readonly rsfe: number;
  readonly mad: number;
  readonly signal: number | null;
}

/**
 * The cumulative-error signal Trigg credits to Brown: RSFE_t / MAD_t with MAD_t the plain mean of |e| so far.
 * Kept beside Trigg's for comparison and reports; the monitor itself uses Trigg's, which is bounded and forgets.
 */
export function cumulativeTrackingSignal(errors: readonly number[]): CumulativeSignalRow[] {
  const rows: CumulativeSignalRow[] = [];
  let rsfe = 0;
  let abs = 0;
  errors.forEach((e, i) => {
    rsfe += e;
    abs += Math.abs(e);
    const mad = abs / (i + 1);
    rows.push({ rsfe, mad, signal: mad > 0 ? rsfe / mad : null });
  });
  return rows;
}
