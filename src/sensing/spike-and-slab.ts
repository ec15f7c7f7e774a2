// Evidence-gated shrinkage. An estimated change δ̂ (a ratio minus 1) with sampling variance v is either noise around
// "no change" (probability π0) or a real change drawn from N(0, τ²). The posterior mean of the change is
//   P(real | δ̂) · τ²/(τ² + v) · δ̂,
// so a deviation within its own noise stays on the baseline and a clear one is followed almost fully. With many
// series, π0 and τ² are estimated from the data (empirical Bayes, by EM); with few, settings supply them.

export interface SlabPrior {
  readonly noChange: number;
  readonly spread2: number;
}

/** P(real change | δ̂) under the prior. */
export function realChangeProbability(delta: number, v: number, prior: SlabPrior): number {
  if (!(v > 0)) return delta === 0 ? 0 : 1;
  const t = prior.spread2 + v;
  const logLr = -0.5 * Math.log(t / v) + 0.5 * delta * delta * (1 / v - 1 / t);
  const odds = (prior.noChange / (1 - prior.noChange)) * Math.exp(-Math.min(logLr, 700));
  return 1 / (1 + odds);
}

/** Weight on δ̂ in the posterior mean: P(real) · τ²/(τ² + v). */
export function evidenceWeight(delta: number, v: number, prior: SlabPrior): number {
  if (!Number.isFinite(delta) || !(v >= 0)) return 0;
  return realChangeProbability(delta, v, prior) * (prior.spread2 / (prior.spread2 + Math.max(v, 1e-300)));
}

export interface SlabFitBounds {
  readonly noChangeMin: number;
  readonly noChangeMax: number;
  readonly spreadMin: number;
  readonly spreadMax: number;
}

/** EM estimate of (π0, τ²) from many series' (δ̂, v), within bounds; fixed iteration count for determinism. */
export function fitSlabPrior(deltas: ArrayLike<number>, variances: ArrayLike<number>, start: SlabPrior, bounds: SlabFitBounds): SlabPrior {
  const n = deltas.length;
  let pi0 = clamp(start.noChange, bounds.noChangeMin, bounds.noChangeMax);
  let tau2 = clamp(start.spread2, bounds.spreadMin ** 2, bounds.spreadMax ** 2);
  const g = new Float64Array(n);
  for (let iter = 0; iter < 40; iter++) {
    let sumG = 0;
    for (let i = 0; i < n; i++) {
      g[i] = realChangeProbability(deltas[i]!, variances[i]!, { noChange: pi0, spread2: tau2 });
      sumG += g[i]!;
    }
    pi0 = clamp(1 - sumG / n, bounds.noChangeMin, bounds.noChangeMax);
    // Fixed-point step for τ² in the heteroscedastic normal model, weighted by membership of the slab.
    let num = 0;
    let den = 0;
    for (let i = 0; i < n; i++) {
      const w = 1 / (tau2 + variances[i]!);
      num += g[i]! * w * w * (deltas[i]! * deltas[i]! - variances[i]!);
      den += g[i]! * w * w;
    }
    const next = den > 0 ? num / den : tau2;
    tau2 = clamp(next, bounds.spreadMin ** 2, bounds.spreadMax ** 2);
  }
  return { noChange: pi0, spread2: tau2 };
}

function clamp(x: number, lo: number, hi: number): number {
  return x < lo ? lo : x > hi ? hi : x;
}
