import { z } from 'zod';
import { locationId } from './ids.ts';
import { localDate } from './primitives.ts';

export const ACCURACY_SCHEMA_VERSION = 'nearcast.accuracy.v1';

const measure = z.object({
  /** Σ|forecast − actual| / Σ actual over the window; null when the window had no actual volume. */
  wape: z.number().nullable(),
  /** Σ(forecast − actual) / Σ actual; positive = over-forecast. */
  bias: z.number().nullable(),
});

/** The self-check's evidence for this location and lead (the same on every band's record). */
const selfCheckEvidence = z.object({
  test: z.enum(['hln', 'sign']),
  /** Complete weeks in the test window. */
  weeks: z.number().int().min(0),
  /** Mean over the weeks of (Σ|adjusted − actual| − Σ|baseline − actual|); positive = sensing lost units. */
  meanWeeklyDifference: z.number(),
  statistic: z.number().nullable(),
  /** One-sided p-value of "sensing is worse than the baseline". */
  pValue: z.number().min(0).max(1).nullable(),
});

/** Self-check of published plans against actuals, per location, lead and volume band ('all' = every band). */
export const accuracySummarySchema = z.object({
  schemaVersion: z.literal(ACCURACY_SCHEMA_VERSION),
  location: locationId,
  lead: z.number().int().min(0),
  /** 'under-1', '1-10', '10-50', '50-400', '400-plus' (mean units a day) or 'all'. */
  volumeBand: z.string().max(32),
  throughWeek: localDate,
  /** The window the measures cover: the latest `windowWeeks` scored weeks up to `throughWeek`. */
  windowWeeks: z.number().int().min(1),
  weeksScored: z.number().int().min(0),
  seriesWeeks: z.number().int().min(0),
  baseline: measure,
  /** The sensed plan (scored even while the fallback publishes the baseline, so the self-check can recover). */
  adjusted: measure,
  /** (WAPE baseline − WAPE adjusted) / WAPE baseline; positive = sensing helps. */
  fva: z.number().nullable(),
  /** Share of actual weeks inside the nominal p10–p90 band, ties at the band's ends counted half. */
  bandCoverage: z.number().min(0).max(1).nullable(),
  /** Series-weeks that had a band to score. */
  bandSeriesWeeks: z.number().int().min(0),
  fallbackActive: z.boolean(),
  selfCheck: selfCheckEvidence.nullable(),
});

export type AccuracySummary = z.infer<typeof accuracySummarySchema>;
