import { z } from 'zod';
import { locationId, itemId } from './ids.ts';
import { localDate } from './primitives.ts';

export const PLAN_SCHEMA_VERSION = 'nearcast.plan.v1';

const finite = z.number().refine(Number.isFinite, { error: 'must be finite' });
const qty = finite.refine((v) => v >= 0, { error: 'must not be negative' });

/** Named fallbacks; each says why a number was not sensed in the usual way. */
export const FALLBACKS = [
  'location-unfit', // the location had too few training rows: baseline unchanged
  'no-baseline', // the series has no baseline: recent run-rate without first-fill orders
  'new-series', // too little history: baseline as prior, updated by first weeks (gamma-Poisson)
  'small-series', // below about one unit a day and no strong exact-test evidence: baseline passed through
  'self-check', // sensing lost to the baseline significantly at this location and lead
  'missing-baseline-week', // the baseline version has no value for this week
] as const;
export const fallback = z.enum(FALLBACKS);
export type Fallback = z.infer<typeof fallback>;

export const GUARDRAILS = ['ratio-upper', 'ratio-lower', 'absolute-upper', 'absolute-lower', 'order-book-floor'] as const;
export const guardrail = z.enum(GUARDRAILS);
export type Guardrail = z.infer<typeof guardrail>;

export const explanationTermSchema = z.object({
  name: z.string(),
  /** The feature's value for this series and lead. */
  value: finite,
  /** Its contribution to the predicted ratio (coefficient × centred value). */
  contribution: finite,
});

export const explanationSchema = z.object({
  method: z.string(),
  baselineVersion: z.number().int().nullable(),
  orderBook: qty,
  survivingOrderBook: qty,
  coverage: finite.nullable(),
  recentRatio: finite.nullable(),
  locationFactor: finite,
  seriesFactor: finite,
  /** Weight given to the series' own evidence (0 = stays with the location model, 1 = fully its own). */
  seriesEvidenceWeight: finite,
  predictedRatio: finite,
  appliedRatio: finite,
  terms: z.array(explanationTermSchema),
  coefficients: z.array(z.object({ name: z.string(), value: finite })),
  fit: z.object({ rows: z.number().int(), series: z.number().int(), weightedR2: finite.nullable(), halfLifeWeeks: finite }),
  guardrail: guardrail.nullable(),
  fallback: fallback.nullable(),
  notes: z.array(z.string()),
});

export const planLeadSchema = z.object({
  lead: z.number().int().min(0).max(12),
  weekStart: localDate,
  baseline: qty.nullable(),
  adjusted: qty,
  /** Quantiles keyed p10, p50, p90 (the configured levels). */
  quantiles: z.record(z.string().regex(/^p\d{1,2}$/), qty),
  /** Quantiles of the cumulative demand over leads 0..this lead. */
  cumulativeQuantiles: z.record(z.string().regex(/^p\d{1,2}$/), qty),
  actualToDate: qty,
  daily: z.array(z.object({ date: localDate, quantity: qty })).optional(),
  explanation: explanationSchema,
});

export const planSchema = z.object({
  schemaVersion: z.literal(PLAN_SCHEMA_VERSION),
  location: locationId,
  item: itemId,
  planDate: localDate,
  /** Restatements of the same plan date get the next revision (monotonic per location and plan date). */
  revision: z.number().int().min(1),
  basis: z.enum(['orders', 'shipments']),
  leads: z.array(planLeadSchema).min(1),
  /** Whether any lead moved beyond the materiality threshold since the previous close. */
  moved: z.boolean(),
  largestMove: finite,
});

export type PlanLead = z.infer<typeof planLeadSchema>;
export type Plan = z.infer<typeof planSchema>;
export type Explanation = z.infer<typeof explanationSchema>;
