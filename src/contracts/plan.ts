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
  /** The term's value for this series and lead (a share of the baseline). */
  value: finite,
  /** Its contribution to the predicted ratio (coefficient × value). */
  contribution: finite,
});

/** How nearcast made the number: the regression, an exact count test, or a fallback's method. */
export const METHODS = ['regression', 'small-series-exact-test', 'baseline', 'gamma-poisson', 'run-rate'] as const;

export const explanationSchema = z.object({
  /** One of METHODS for plans nearcast publishes. */
  method: z.string().max(40),
  baselineVersion: z.number().int().nullable(),
  /** Order book for the week as known at the as-of moment (lead 0: actual to date plus booked rest). */
  orderBook: qty,
  /** Part of the order book on lines far larger than usual: kept in the week, kept out of ratios. */
  largeLines: qty,
  /** Share of booked quantity expected to survive at this lead, and the resulting floor (lead 0: actual to date plus the surviving booked rest). */
  survivalRate: finite,
  survivingOrderBook: qty,
  /** The series' typical share of a week already booked at this lead and weekday. */
  typicalBookShare: finite.nullable(),
  coverage: finite.nullable(),
  recentRatio: finite.nullable(),
  locationFactor: finite,
  seriesFactor: finite,
  /** Weight given to the series' own evidence (0 = no change, 1 = its own deviation fully). */
  seriesEvidenceWeight: finite,
  predictedRatio: finite,
  appliedRatio: finite.nullable(),
  /** Guardrail bounds around the baseline (null without a baseline). */
  bounds: z.object({ lower: qty, upper: qty }).nullable(),
  terms: z.array(explanationTermSchema),
  coefficients: z.array(z.object({ name: z.string(), value: finite })),
  fit: z.object({ rows: z.number().int(), series: z.number().int(), weightedR2: finite.nullable(), halfLifeWeeks: finite }),
  /** Volume band and the dispersion φ of the predictive distribution (Var = mean + φ·mean²). */
  volumeBand: z.string().max(32),
  dispersion: finite,
  guardrail: guardrail.nullable(),
  fallback: fallback.nullable(),
  notes: z.array(z.string().max(300)),
});

export const planLeadSchema = z.object({
  lead: z.number().int().min(0).max(12),
  weekStart: localDate,
  baseline: qty.nullable(),
  adjusted: qty,
  /** Quantiles keyed p10, p50, p90 (the configured levels), never below the surviving order book. */
  quantiles: z.record(z.string().regex(/^p\d{1,2}$/), qty),
  /** Quantiles of the cumulative demand over leads 0..this lead. */
  cumulativeQuantiles: z.record(z.string().regex(/^p\d{1,2}$/), qty),
  actualToDate: qty,
  /** Leads 0 and 1: the adjusted quantity split into the week's days. */
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
  /** Whether any lead moved beyond the materiality threshold since the previous close (true on a first plan). */
  moved: z.boolean(),
  /** Largest absolute change of a lead's adjusted quantity since the previous close, matched by week (units). */
  largestMove: finite,
});

export type PlanLead = z.infer<typeof planLeadSchema>;
export type Plan = z.infer<typeof planSchema>;
export type Explanation = z.infer<typeof explanationSchema>;
