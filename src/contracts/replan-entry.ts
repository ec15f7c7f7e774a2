import { z } from 'zod';
import { locationId, itemId } from './ids.ts';
import { localDate } from './primitives.ts';

export const REPLAN_SCHEMA_VERSION = 'nearcast.replan.v1';

const num = z.number().refine(Number.isFinite, { error: 'must be finite' });

/** One series worth re-planning in the next planning cycle, with the evidence. */
export const replanEntrySchema = z.object({
  schemaVersion: z.literal(REPLAN_SCHEMA_VERSION),
  location: locationId,
  item: itemId,
  /** Start of the week this list is for. */
  weekOf: localDate,
  reason: z.enum(['baseline-bias', 'persistent-adjustment']),
  /** The baseline ran below actual demand (`under`) or above it (`over`); for adjustments, the adjustment's direction. */
  direction: z.enum(['under', 'over']),
  /** The fixed lead the baseline is scored at (weeks ahead when it was known). */
  lead: z.number().int().min(0),
  /** The baseline version in force; the signal restarts when it changes (a re-plan). */
  baselineVersion: z.number().int().nullable(),
  /** Trigg's smoothed tracking signal at the monitored lead (between -1 and 1). */
  trackingSignal: z.number().min(-1).max(1).nullable(),
  /** Σ actual / Σ baseline (baseline bias) or Σ adjusted / Σ baseline (adjustment) over the weeks behind the entry. */
  meanRatio: num.nullable(),
  /** Weeks scored since the last re-plan. */
  weeks: z.number().int().min(0),
  /** The most recent weeks behind the entry, oldest first. */
  history: z
    .array(z.object({ weekStart: localDate, actual: num, baseline: num, adjusted: num.nullable() }))
    .max(52),
  /** Units a week the baseline is off by, on average over the weeks behind the entry. */
  unitsPerWeek: num.nullable(),
  evidence: z.string().max(2000),
});

export type ReplanEntry = z.infer<typeof replanEntrySchema>;
