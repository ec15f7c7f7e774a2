import { weekValue } from './baseline-lookup.ts';
import { seriesTermsAt } from './as-of-signals.ts';
import { computeFeatures, type Features } from './features.ts';
import type { SenseWork } from './sense-location.ts';

/**
 * The features of one series for target week index t (0 = the plan date's week, −n = n weeks ago) at a lead, as
 * the fit sees them: live rows have t = lead (as-of index 0), training rows t = −n (as-of index n + lead). Used by
 * explanations and by the no-leakage check. Undefined when the series or its baseline is missing.
 */
export function featuresAt(work: SenseWork, item: string, weekIndex: number, lead: number): Features | undefined {
  const i = work.inputs.findIndex((x) => x.item === item);
  const j = lead - weekIndex;
  if (i < 0 || j < 0 || j > work.ctx.J) return undefined;
  const sig = work.signals[j]!;
  const si = seriesTermsAt(sig, i);
  const p = work.ctx.H + weekIndex;
  const b = weekValue(sig.ref[i], work.ctx.week0 + 7 * weekIndex);
  if (!si || b === undefined || !(b > 0)) return undefined;
  return computeFeatures(work.inputs[i]!, si, sig.location, work.ctx, p, lead, b);
}
