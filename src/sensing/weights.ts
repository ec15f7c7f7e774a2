// Caps on any one series' share of a location's weight, so a few large items cannot set the model and one
// promotion cannot tip it.

/**
 * Scale factors (≤ 1) per group so that no group holds more than `cap` of the total after capping: the groups
 * above the cap are cut to a common level t with t = cap · Σ min(Wᵍ, t), found by water-filling. When the cap is
 * below 1/groups it cannot be met and every group gets the same weight instead.
 */
export function capFactors(groupTotals: ArrayLike<number>, cap: number): Float64Array {
  const n = groupTotals.length;
  const out = new Float64Array(n).fill(1);
  let live = 0;
  for (let i = 0; i < n; i++) if (groupTotals[i]! > 0) live++;
  if (live === 0) return out;
  const effectiveCap = Math.max(cap, 1 / live);
  // Descending totals: a native numeric sort of the positive ones, read back to front (equal totals are equal
  // numbers, so the order among them cannot matter).
  const ascending = new Float64Array(live);
  for (let i = 0, k = 0; i < n; i++) if (groupTotals[i]! > 0) ascending[k++] = groupTotals[i]!;
  ascending.sort();
  const sorted = new Float64Array(live);
  for (let k = 0; k < live; k++) sorted[k] = ascending[live - 1 - k]!;
  let total = 0;
  for (let k = 0; k < live; k++) total += sorted[k]!;
  if (sorted[0]! <= effectiveCap * total) return out;
  // With the top r groups cut to t: t = cap·(r·t + rest) ⇒ t = cap·rest / (1 − cap·r); the right r is the one
  // whose t lies between the (r+1)-th and the r-th largest total.
  let rest = total;
  let t = Infinity;
  for (let r = 1; r <= sorted.length; r++) {
    rest -= sorted[r - 1]!;
    const denom = 1 - effectiveCap * r;
    if (denom <= 1e-12) {
      t = sorted[sorted.length - 1]!;
      break;
    }
    const candidate = (effectiveCap * rest) / denom;
    if (candidate >= (sorted[r] ?? 0) && candidate <= sorted[r - 1]!) {
      t = candidate;
      break;
    }
  }
  if (!Number.isFinite(t)) return out;
  for (let i = 0; i < n; i++) if (groupTotals[i]! > t) out[i] = t / groupTotals[i]!;
  return out;
}

/** Recency weight of something `ageWeeks` old with the given half-life. */
export function recencyWeight(ageWeeks: number, halfLifeWeeks: number): number {
  return 0.5 ** (ageWeeks / halfLifeWeeks);
}
