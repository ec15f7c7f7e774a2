// Benjamini & Hochberg (1995), "Controlling the false discovery rate", JRSS B 57(1), 289-300 (recalled from memory):
// with m p-values sorted ascending, reject the hypotheses of the i smallest, i the largest with p_(i) ≤ i·q/m.

export interface BhResult {
  /** Whether each input (in input order) is a discovery at level q. */
  readonly rejected: boolean[];
  /** BH-adjusted p-values (q-values), in input order: min over j ≥ i of m·p_(j)/j, capped at 1. */
  readonly adjusted: number[];
}

export function benjaminiHochberg(pValues: readonly number[], q: number): BhResult {
  const m = pValues.length;
  const order = pValues.map((p, i) => ({ p: Number.isFinite(p) ? p : 1, i })).sort((a, b) => a.p - b.p || a.i - b.i);
  const adjusted = new Array<number>(m).fill(1);
  let running = 1;
  for (let r = m - 1; r >= 0; r--) {
    const { p, i } = order[r]!;
    running = Math.min(running, (m * p) / (r + 1));
    adjusted[i] = Math.min(1, running);
  }
  let cutoff = -1;
  for (let r = 0; r < m; r++) if (order[r]!.p <= ((r + 1) * q) / m) cutoff = r;
  const rejected = new Array<boolean>(m).fill(false);
  for (let r = 0; r <= cutoff; r++) rejected[order[r]!.i] = true;
  return { rejected, adjusted };
}
