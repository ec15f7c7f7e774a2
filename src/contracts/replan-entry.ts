import { z } from 'zod';
import { locationId, itemId } from './ids.ts';
import { localDate } from './primitives.ts';

export const REPLAN_SCHEMA_VERSION = 'nearcast.replan.v1';

/** One series worth re-planning in the next planning cycle, with the evidence. */
export const replanEntrySchema = z.object({
  schemaVersion: z.literal(REPLAN_SCHEMA_VERSION),
  location: locationId,
  item: itemId,
  weekOf: localDate,
  reason: z.enum(['baseline-bias', 'persistent-adjustment']),
  /** Trigg's smoothed tracking signal at the monitored lead (between -1 and 1). */
  trackingSignal: z.number().min(-1).max(1).nullable(),
  /** Mean of actual / baseline (or adjusted / baseline) over the weeks behind the entry. */
  meanRatio: z.number().nullable(),
  weeks: z.number().int().min(0),
  evidence: z.string().max(2000),
});

export type ReplanEntry = z.infer<typeof replanEntrySchema>;
