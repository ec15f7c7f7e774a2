import { z } from 'zod';
import { locationId } from './ids.ts';
import { clockTime, identifier, localDate, nonNegativeNumber, timeZone, weekday } from './primitives.ts';

export const holidaySchema = z.object({
  date: localDate,
  kind: z.enum(['closed', 'reduced'], { error: 'must be closed or reduced' }),
  name: z.string().max(80, { error: 'must be at most 80 characters' }).optional(),
});

export const itemMasterSchema = z.object({
  unitPrice: nonNegativeNumber.optional(),
  casePack: nonNegativeNumber.optional(),
});

/** Location master data: known from the moment it is read; a change applies from then on. */
export const locationSchema = z
  .object({
    location: locationId,
    timeZone,
    weekStart: weekday.optional(),
    closedWeekdays: z.array(weekday).max(6, { error: 'must leave at least one open weekday' }).optional(),
    holidays: z.array(holidaySchema).max(400, { error: 'must list at most 400 holidays' }).optional(),
    businessHours: z.object({ open: clockTime, close: clockTime }).optional(),
    /** Local time on the following day by which the day must be closed, e.g. "02:00". */
    dayCloseDeadline: clockTime.optional(),
    items: z.record(identifier, itemMasterSchema).optional(),
  })
  .superRefine((r, ctx) => {
    if (r.businessHours && r.businessHours.open >= r.businessHours.close) {
      ctx.addIssue({ code: 'custom', path: ['businessHours', 'close'], message: 'must be later than open' });
    }
    if (r.items && Object.keys(r.items).length > 100_000) {
      ctx.addIssue({ code: 'custom', path: ['items'], message: 'must list at most 100000 items' });
    }
  });

export type Location = z.infer<typeof locationSchema>;
export type Holiday = z.infer<typeof holidaySchema>;
