import { negBinomialQuantile } from '../stats/count-distributions.ts';

// Predictive quantiles: a week's demand is the certain part C (actual to date and the order book expected to
// survive) plus an uncertain rest Y ~ NB(mean m, dispersion φ) with Var Y = m + φm². Quantiles of C + Y are
// monotone in p and never below C, so p50 respects the floor. Cumulative demand over leads 0..k sums the certain
// parts and matches an NB to the summed mean and variance, with correlated over-Poisson errors (a shared level
// error moves all leads together), so the p90 of the sum is not the sum of the p90s.

export interface LeadDistribution {
  readonly certain: number;
  readonly mean: number;
  readonly phi: number;
}

const labels = new Map<number, string>();

export function quantileLabel(p: number): string {
  let label = labels.get(p);
  if (label === undefined) {
    label = `p${Math.round(p * 100)}`;
    if (labels.size < 256) labels.set(p, label);
  }
  return label;
}

export function leadQuantiles(d: LeadDistribution, levels: readonly number[]): Record<string, number> {
  const out: Record<string, number> = {};
  for (const p of levels) out[quantileLabel(p)] = d.certain + (d.mean > 0 ? negBinomialQuantile(p, d.mean, d.phi) : 0);
  return out;
}

/** Cumulative quantiles over leads 0..k for every k, non-decreasing in k. */
export function cumulativeQuantiles(leads: readonly LeadDistribution[], levels: readonly number[], correlation: number): Record<string, number>[] {
  const out: Record<string, number>[] = [];
  let certain = 0;
  let mean = 0;
  const extraSd: number[] = [];
  let prev: Record<string, number> | undefined;
  for (const d of leads) {
    certain += d.certain;
    mean += d.mean;
    extraSd.push(Math.sqrt(d.phi) * d.mean);
    let extraVar = 0;
    for (let a = 0; a < extraSd.length; a++) {
      for (let b = 0; b < extraSd.length; b++) extraVar += (a === b ? 1 : correlation) * extraSd[a]! * extraSd[b]!;
    }
    const phi = mean > 0 ? extraVar / (mean * mean) : 0;
    const q = leadQuantiles({ certain, mean, phi }, levels);
    if (prev) for (const k of Object.keys(q)) q[k] = Math.max(q[k]!, prev[k]!);
    out.push(q);
    prev = q;
  }
  return out;
}
