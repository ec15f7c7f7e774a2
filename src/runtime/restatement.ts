import type { Plan } from '../contracts/plan.ts';

/**
 * Size of a restatement: Σ over series and leads of |new − published| over Σ published adjusted quantity. A series
 * that appears or disappears counts in full. When nothing was published, any change counts as the whole.
 */
export function restatementShare(published: Readonly<Record<string, readonly number[]>>, plans: readonly Plan[]): number {
  let change = 0;
  let total = 0;
  const seen = new Set<string>();
  for (const plan of plans) {
    seen.add(plan.item);
    const before = published[plan.item] ?? [];
    const n = Math.max(before.length, plan.leads.length);
    for (let i = 0; i < n; i++) {
      const a = before[i] ?? 0;
      const b = plan.leads[i]?.adjusted ?? 0;
      change += Math.abs(b - a);
      total += a;
    }
  }
  for (const [item, before] of Object.entries(published)) {
    if (seen.has(item)) continue;
    for (const a of before) {
      change += Math.abs(a);
      total += a;
    }
  }
  if (total === 0) return change > 0 ? Number.POSITIVE_INFINITY : 0;
  return change / total;
}
