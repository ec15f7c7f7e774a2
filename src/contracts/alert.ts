import { z } from 'zod';
import { locationId } from './ids.ts';
import { identifier, localDate } from './primitives.ts';

export const ALERT_SCHEMA_VERSION = 'nearcast.alert.v1';

export const ALERT_RULES = [
  'spike',
  'drop',
  'shift-up',
  'shift-down',
  'plan-divergence',
  'feed-stalled',
  'day-not-closed',
] as const;
export const alertRule = z.enum(ALERT_RULES);
export type AlertRule = z.infer<typeof alertRule>;

export const ALERT_STATES = ['open', 'acknowledged', 'snoozed', 'resolved'] as const;
export const alertState = z.enum(ALERT_STATES);
export type AlertState = z.infer<typeof alertState>;

export const alertSchema = z.object({
  schemaVersion: z.literal(ALERT_SCHEMA_VERSION),
  /** Stable identity: location|item|rule|episodeStart (item is '*' for a location- or customer-wide group). */
  alertId: z.string().max(300),
  location: locationId,
  item: z.string().max(64),
  rule: alertRule,
  /** What the alert covers: one series, or a group of series firing the same way. */
  scope: z.enum(['series', 'location', 'customer', 'item']),
  episodeStart: localDate,
  state: alertState,
  /** Number of this state change for the alert (1 = opened); consumers de-duplicate by alertId and seq. */
  seq: z.number().int().min(1),
  changedOn: localDate,
  severity: z.enum(['low', 'medium', 'high']),
  /** Whether it went to the on-call page, or only to the daily digest (page budget, value floor). */
  delivery: z.enum(['page', 'digest']),
  observed: z.number().nullable(),
  expected: z.number().nullable(),
  lower: z.number().nullable(),
  upper: z.number().nullable(),
  pValue: z.number().min(0).max(1).nullable(),
  /** Money at risk where a unit price is known; never shown to a distribution centre. */
  valueAtRisk: z.number().nullable(),
  members: z.array(z.object({ location: locationId, item: z.string().max(64), customer: identifier.optional() })),
  snoozedUntil: localDate.nullable(),
  message: z.string().max(2000),
  whatToCheck: z.string().max(2000),
});

export type Alert = z.infer<typeof alertSchema>;
