// EWMA control chart, Roberts (1959), in the form of NIST/SEMATECH e-Handbook 6.3.2.4: z_t = λx_t + (1 − λ)z_{t−1},
// limits target ± L·σ·√(λ/(2 − λ)·(1 − (1 − λ)^{2t})); the asymptotic limits drop the last factor.

export interface EwmaState {
  readonly z: number;
  /** Observations since the start or the last reset. */
  readonly t: number;
}

export function ewmaStart(target: number): EwmaState {
  return { z: target, t: 0 };
}

export function ewmaStep(state: EwmaState, x: number, lambda: number): EwmaState {
  return { z: lambda * x + (1 - lambda) * state.z, t: state.t + 1 };
}

/** Half-width of the limits after t observations; t = Infinity gives the asymptotic half-width. */
export function ewmaHalfWidth(sigma: number, lambda: number, L: number, t: number): number {
  const decay = Number.isFinite(t) ? 1 - (1 - lambda) ** (2 * t) : 1;
  return L * sigma * Math.sqrt((lambda / (2 - lambda)) * decay);
}

export function ewmaSignal(state: EwmaState, target: number, sigma: number, lambda: number, L: number): 'up' | 'down' | null {
  const w = ewmaHalfWidth(sigma, lambda, L, state.t);
  if (state.z > target + w) return 'up';
  if (state.z < target - w) return 'down';
  return null;
}
