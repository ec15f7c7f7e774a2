import type { RecomputeContext } from './recompute-context.ts';
import { at } from './series-frame.ts';
import type { SeriesInput } from './series-input.ts';

/**
 * Share of the quantity booked by the as-of weekday at each lead that was still there when the week completed
 * (lines cut, cancelled or moved out of the week lower it), pooled over the location's series and complete weeks
 * of the lookback, with a prior. Used for the floor: never plan below the order book expected to survive.
 */
export function survivalByLead(inputs: readonly SeriesInput[], ctx: RecomputeContext): Float64Array {
  const s = ctx.settings;
  const out = new Float64Array(s.maxLead + 1);
  for (let L = 0; L <= s.maxLead; L++) {
    let num = 0;
    let den = 0;
    for (const input of inputs) {
      const f = input.frame;
      for (let n = 1; n <= s.lookbackWeeks; n++) {
        const p = ctx.H - n;
        const booked = L === 0 ? f.known0[p]! + f.known0Large[p]! : at(f.book, ctx, p, s.maxLead - L) + at(f.bookLarge, ctx, p, s.maxLead - L);
        if (!(booked > 0)) continue;
        num += Math.min(booked, f.survivingBooked[p * (s.maxLead + 1) + L]!);
        den += booked;
      }
    }
    // The prior is worth `survivalPriorWeeks` weeks of the location's own booked volume (scale-free).
    const prior = den > 0 ? (s.survivalPriorWeeks * den) / s.lookbackWeeks : 1;
    out[L] = Math.min(1, (num + s.survivalPrior * prior) / (den + prior));
  }
  return out;
}
