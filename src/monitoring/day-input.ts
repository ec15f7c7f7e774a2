import { z } from 'zod';
import { locationId } from '../contracts/ids.ts';
import { clockTime, identifier, localDate, timeZone as zoneSchema } from '../contracts/primitives.ts';

// What the runtime hands monitoring for one closed business day of one location. Everything in it is something
// the sensing engine already has: the day's order intake per series by `orderedAt` local date, the intake its
// previous plan and its baseline imply for the day, and a few facts about the feed.

// Zone validation builds a formatter each time; a location has one zone, checked once per process.
const knownZones = new Set<string>();
const timeZone = z.string().superRefine((v, ctx) => {
  if (knownZones.has(v)) return;
  const r = zoneSchema.safeParse(v);
  if (r.success) knownZones.add(v);
  else for (const issue of r.error.issues) ctx.addIssue({ code: 'custom', message: issue.message });
});

const finite = z.number({ error: 'must be a number' }).refine(Number.isFinite, { error: 'must be a finite number' });
const nonNegative = finite.refine((v) => v >= 0, { error: 'must not be negative' });
const epochMs = z.number({ error: 'must be epoch milliseconds' }).int({ error: 'must be whole epoch milliseconds' });

export const seriesDaySchema = z
  .object({
    item: identifier,
    /** Units ordered on this local date (by `orderedAt`), as known when the day closed. */
    intake: nonNegative,
    /** Intake the plan published before the day expected for it (day-of-week intake profile × adjusted week). */
    expectedFromPlan: nonNegative.nullable(),
    /** Intake the baseline version in force implies for the day (the same profile × baseline week). */
    expectedFromBaseline: nonNegative.nullable(),
    /** Version of that baseline; a change is a re-plan (shift level and tracking signal restart). */
    baselineVersion: z.number().int().nullable().optional(),
    unitPrice: nonNegative.optional(),
    /** Units per case where the item is ordered in cases (counts are tested in cases). */
    casePack: finite.refine((v) => v > 0, { error: 'must be positive' }).optional(),
    /** Dispersion φ known elsewhere (sensing's for the series' band): the prior that monitoring's own intake evidence refines. */
    dispersion: nonNegative.optional(),
    /** The day's intake split by customer (customer grouping and attribution). */
    byCustomer: z.array(z.object({ customer: identifier, intake: nonNegative })).max(1_000).optional(),
    /** Records that arrived after their own day had closed: late data, reported, never tested as today's intake. */
    lateIntake: z.array(z.object({ date: localDate, quantity: nonNegative })).max(400).optional(),
    /** The monitored lead of the plan just published: baseline, adjusted and its band (p10–p90) for that week. */
    planLead: z
      .object({ lead: z.number().int().min(0).max(12), weekStart: localDate, baseline: nonNegative, adjusted: nonNegative, lower: nonNegative, upper: nonNegative })
      .refine((p) => p.lower <= p.upper, { error: 'lower must not exceed upper', path: ['lower'] })
      .optional(),
    /** Given on the first close after a week completed: its demand and the baseline (and adjusted plan) known at the lead. */
    weekClosed: z
      .object({
        weekStart: localDate,
        lead: z.number().int().min(0).max(12),
        actual: nonNegative,
        baselineAtLead: nonNegative,
        baselineVersionAtLead: z.number().int().nullable().optional(),
        adjustedAtLead: nonNegative.nullable().optional(),
      })
      .optional(),
  })
  .strict();

export type SeriesDay = z.infer<typeof seriesDaySchema>;

export const businessHoursSchema = z
  .object({ open: clockTime, close: clockTime })
  .refine((h) => h.open < h.close, { error: 'close must be later than open', path: ['close'] });

/** Facts about the location's feed; the core reads no clock, so every instant is given. */
export const dayFeedSchema = z
  .object({
    /** How the day came to be closed. */
    closedBy: z.enum(['day-closed', 'watermark', 'deadline']),
    /** The location names its own close deadline: only then is a deadline close the source's failure. */
    ownDeadline: z.boolean().default(true),
    /** When the day was closed. */
    closeMs: epochMs,
    /** Arrival of the last order line or shipment of this location, or null if none ever arrived. */
    lastRecordMs: epochMs.nullable(),
    /** A feed-health check during the day already found the feed silent in business hours. */
    stalledDuringDay: z.boolean().optional(),
    businessHours: businessHoursSchema.optional(),
    /** Typical records an hour in business hours, if known: a quiet feed is only stalled once silence is improbable. */
    recordsPerHour: nonNegative.optional(),
  })
  .strict();

export const alertCommandSchema = z
  .object({
    commandId: identifier,
    alertId: z.string().min(1).max(300),
    action: z.enum(['acknowledge', 'snooze', 'resolve'], { error: 'must be acknowledge, snooze or resolve' }),
    /** Snooze only: the last local date the alert stays quiet. */
    until: localDate.optional(),
    by: z.string().max(100).optional(),
    atMs: epochMs,
  })
  .refine((c) => c.action !== 'snooze' || c.until !== undefined, { error: 'is required to snooze', path: ['until'] });

export type MonitorCommand = z.infer<typeof alertCommandSchema>;

export const dayInputSchema = z
  .object({
    location: locationId,
    date: localDate,
    /** Start of the week the date belongs to (the location's week start): the re-plan list is weekly. */
    weekStart: localDate,
    timeZone,
    /** A reduced-hours holiday (closed days are not business days and are never monitored). */
    isHoliday: z.boolean(),
    /** Entries are validated one by one: a bad one is quarantined with its reason, the others are monitored. */
    series: z.array(z.unknown()).max(200_000),
    feed: dayFeedSchema,
    commands: z.array(alertCommandSchema).max(10_000).optional(),
  })
  .strict()
  .refine((d) => d.weekStart <= d.date, { error: 'must not be after date', path: ['weekStart'] });

export type DayInput = Omit<z.input<typeof dayInputSchema>, 'series'> & { series: readonly unknown[] };
export type ParsedDayInput = Omit<z.output<typeof dayInputSchema>, 'series'> & { series: SeriesDay[] };

/** Facts for a feed-health check during the day. */
export const feedCheckSchema = z
  .object({
    location: locationId,
    atMs: epochMs,
    timeZone,
    lastRecordMs: epochMs.nullable(),
    /** Whether the check's local date is a business day (no check is meaningful on a closed day). */
    isBusinessDay: z.boolean(),
    businessHours: businessHoursSchema.optional(),
    recordsPerHour: nonNegative.optional(),
  })
  .strict();

export type FeedCheck = z.input<typeof feedCheckSchema>;

export interface Issue {
  readonly path: string;
  readonly message: string;
}

export function issuesOf(error: z.ZodError, prefix = ''): Issue[] {
  return error.issues.map((i) => ({
    path: [prefix, ...i.path.map(String)].filter((p) => p !== '').join('.'),
    message: i.code === 'invalid_type' && i.message.startsWith('Invalid input') ? `must be ${i.expected}` : i.message,
  }));
}

