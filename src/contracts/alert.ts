import { z } from 'zod';
import { locationId } from './ids.ts';
import { identifier, localDate } from './primitives.ts';

export const ALERT_SCHEMA_VERSION = 'nearcast.alert.v1';

export const ALERT_RULES = [
  'spike', // one day's intake above its exact upper limit
  'drop', // ... below its exact lower limit
  'shift-up', // the CUSUM (or EWMA) of intake against the re-centred baseline signalled upward
  'shift-down',
  'plan-divergence', // the adjusted plan far from the baseline, and the baseline outside the plan's band
  'feed-stalled', // the location sent nothing for a long stretch of its business hours
  'day-not-closed', // the source did not close the day by its deadline
  'demand-up', // a group: many series (of a location, a customer, or one item across locations) up together
  'demand-down',
] as const;
export const alertRule = z.enum(ALERT_RULES);
export type AlertRule = z.infer<typeof alertRule>;

export const ALERT_STATES = ['open', 'acknowledged', 'snoozed', 'resolved'] as const;
export const alertState = z.enum(ALERT_STATES);
export type AlertState = z.infer<typeof alertState>;

/** What happened to the alert in this record: each change is published once. */
export const ALERT_CHANGES = [
  'opened',
  'reopened', // fired again within a few days of resolving: same identity
  'escalated', // the deviation got worse (severity up); an acknowledged or snoozed alert is open again
  'acknowledged',
  'snoozed',
  'snooze-ended',
  'resolved', // by a person
  'auto-resolved', // after a run of in-control days, or the condition is gone (records flow again)
  'members-changed', // a group gained members
] as const;
export const alertChange = z.enum(ALERT_CHANGES);
export type AlertChange = z.infer<typeof alertChange>;

const num = z.number().refine(Number.isFinite, { error: 'must be finite' });
const member = z.object({ location: locationId, item: identifier, customer: identifier.optional() });

export const MAX_ALERT_MEMBERS = 1_000;

export const alertSchema = z.object({
  schemaVersion: z.literal(ALERT_SCHEMA_VERSION),
  /**
   * Stable identity location|item|rule|episodeStart. item is `*` for a location group and `*customer:<digest>` for a
   * customer group (a digest, so ids never carry a customer's name); location is `*` for one item grouped across
   * locations.
   */
  alertId: z.string().max(300),
  location: z.union([locationId, z.literal('*')]),
  item: z.string().max(80),
  /** The customer a customer group is about, or the customer that carries most of a series' deviation; hide it from a distribution centre. */
  customer: identifier.nullable(),
  rule: alertRule,
  /** Every rule that fired during the episode (a spike followed by a CUSUM signal is one episode, one alert). */
  firedRules: z.array(alertRule),
  /** What the alert covers: one series, or a group of series firing the same way. */
  scope: z.enum(['series', 'location', 'customer', 'item']),
  episodeStart: localDate,
  state: alertState,
  change: alertChange,
  /** Number of this state change for the alert (1 = opened); consumers de-duplicate by alertId and seq. */
  seq: z.number().int().min(1),
  changedOn: localDate,
  /** Who made the change (a person's command), null when monitoring made it. */
  changedBy: z.string().max(100).nullable(),
  lastSignalOn: localDate,
  severity: z.enum(['low', 'medium', 'high']),
  /** Whether it goes to the on-call page, or only to the daily digest (page budget, grouped under another alert). */
  delivery: z.enum(['page', 'digest']),
  /** The group alert that covers this series alert, if any. */
  groupId: z.string().max(300).nullable(),
  observed: num.nullable(),
  expected: num.nullable(),
  /** The exact limits of the day's intake (point rules). */
  lower: num.nullable(),
  upper: num.nullable(),
  /** Exact two-sided tail probability (point rules) and its Benjamini–Hochberg adjusted value across the location's series that day. */
  pValue: z.number().min(0).max(1).nullable(),
  qValue: z.number().min(0).max(1).nullable(),
  /** Shifts: the re-centred level over the baseline; plan divergence: adjusted over baseline. */
  levelRatio: num.nullable(),
  /** Shifts: the CUSUM sum (σ units) or the EWMA value when it signalled. */
  statistic: num.nullable(),
  /** Size of the deviation in units: the day (point rules), `valueHorizonDays` days (shifts), the week (divergence). */
  unitsAtRisk: num.nullable(),
  /** Money at risk where a unit price is known; never shown to a distribution centre. */
  valueAtRisk: num.nullable(),
  /** Series covered (the series itself for series scope); capped, see memberCount. */
  members: z.array(member).max(MAX_ALERT_MEMBERS),
  memberCount: z.number().int().min(0),
  snoozedUntil: localDate.nullable(),
  message: z.string().max(2000),
  whatToCheck: z.string().max(2000),
});

export type Alert = z.infer<typeof alertSchema>;
export type AlertMember = z.infer<typeof member>;
