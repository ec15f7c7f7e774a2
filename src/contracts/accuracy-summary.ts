import { z } from 'zod';
import { locationId } from './ids.ts';
import { localDate } from './primitives.ts';

export const ACCURACY_SCHEMA_VERSION = 'nearcast.accuracy.v1';

const measure = z.object({ wape: z.number().nullable(), bias: z.number().nullable() });

/** Self-check of published plans against actuals, per location, lead and volume band. */
export const accuracySummarySchema = z.object({
  schemaVersion: z.literal(ACCURACY_SCHEMA_VERSION),
  location: locationId,
  lead: z.number().int().min(0),
  volumeBand: z.string().max(32),
  throughWeek: localDate,
  weeksScored: z.number().int().min(0),
  seriesWeeks: z.number().int().min(0),
  baseline: measure,
  adjusted: measure,
  /** (WAPE baseline − WAPE adjusted) / WAPE baseline; positive = sensing helps. */
  fva: z.number().nullable(),
  /** Share of actual weeks inside the nominal p10–p90 band. */
  bandCoverage: z.number().min(0).max(1).nullable(),
  fallbackActive: z.boolean(),
});

export type AccuracySummary = z.infer<typeof accuracySummarySchema>;
