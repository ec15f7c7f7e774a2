import { z } from 'zod';
import { locationId } from '../contracts/ids.ts';
import { identifier, localDate } from '../contracts/primitives.ts';

// Records nearcast writes into its own event log. They are facts like any input: a replay of the log reads them
// back, so a replay closes the same days, sees the same feed-health checks and applies the same alert commands.

/** The shell saw the wall clock (live) or the replay clock (backtest) pass a location's day-close deadline. */
export const deadlineCloseSchema = z.object({
  location: locationId,
  date: localDate,
  /** The deadline instant that passed, epoch milliseconds. */
  deadlineMs: z.number().int(),
});
export type DeadlineClose = z.infer<typeof deadlineCloseSchema>;

/** A periodic check during business hours: has the location's feed sent anything lately? */
export const feedHealthCheckSchema = z.object({
  location: locationId,
  /** When the check ran, epoch milliseconds. */
  atMs: z.number().int(),
});
export type FeedHealthCheck = z.infer<typeof feedHealthCheckSchema>;

export const ALERT_ACTIONS = ['acknowledge', 'snooze', 'resolve'] as const;
export type AlertAction = (typeof ALERT_ACTIONS)[number];

/** A planner's acknowledge / snooze / resolve, applied by the owner of the alert's location partition. */
export const alertCommandSchema = z
  .object({
    commandId: identifier,
    location: locationId,
    alertId: z.string().min(1).max(300),
    action: z.enum(ALERT_ACTIONS, { error: 'must be acknowledge, snooze or resolve' }),
    /** Snooze only: the last local date the alert stays quiet. */
    until: localDate.optional(),
    /** Who asked (token name); never a secret. */
    by: z.string().max(100).optional(),
    atMs: z.number().int(),
  })
  .superRefine((c, ctx) => {
    if (c.action === 'snooze' && c.until === undefined) {
      ctx.addIssue({ code: 'custom', path: ['until'], message: 'is required to snooze' });
    }
  });
export type AlertCommand = z.infer<typeof alertCommandSchema>;
