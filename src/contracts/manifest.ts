import { z } from 'zod';
import { locationId } from './ids.ts';
import { localDate } from './primitives.ts';
import { fallback } from './plan.ts';

export const MANIFEST_SCHEMA_VERSION = 'nearcast.manifest.v1';

/** The model of one lead at the location: what was fitted, on what, and how well. */
export const manifestModelSchema = z.object({
  lead: z.number().int().min(0),
  rows: z.number().int().min(0),
  series: z.number().int().min(0),
  fallback: fallback.nullable(),
  coefficients: z.array(z.object({ name: z.string(), value: z.number() })),
  weightedR2: z.number().nullable(),
  /** Evidence-gated location-wide factor (1 = no location-wide change) at the as-of moment. */
  locationFactor: z.number(),
  survivalRate: z.number(),
  /** Dispersion φ per volume band. */
  dispersion: z.array(z.object({ band: z.string(), phi: z.number() })),
});

/** Published after every plan record of a close, so a consumer knows the run is complete. */
export const manifestSchema = z.object({
  schemaVersion: z.literal(MANIFEST_SCHEMA_VERSION),
  location: locationId,
  planDate: localDate,
  revision: z.number().int().min(1),
  seriesCount: z.number().int().min(0),
  /** SHA-256 (hex) over the plan records of this close in key order. */
  checksum: z.string().regex(/^[0-9a-f]{64}$/),
  model: z.array(manifestModelSchema),
});

export type Manifest = z.infer<typeof manifestSchema>;
export type ManifestModel = z.infer<typeof manifestModelSchema>;
