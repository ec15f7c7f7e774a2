import { z } from 'zod';
import { locationId, itemId } from './ids.ts';
import { identifier, localDate, parseTimestamp, positiveInt, quantity, timestamp, type InputLimits } from './primitives.ts';

const DAY_MS = 86_400_000;

export function orderLineSchema(limits: InputLimits) {
  return z
    .object({
      eventId: identifier,
      orderId: identifier,
      lineId: identifier,
      revision: positiveInt,
      op: z.enum(['upsert', 'cancel'], { error: 'must be upsert or cancel' }),
      location: locationId,
      item: itemId,
      // An upsert carries the line's full new state; a cancel zeroes it, so its quantity may be left out.
      quantity: quantity(limits).optional(),
      orderedAt: timestamp(limits),
      changedAt: timestamp(limits).optional(),
      requestedDate: localDate,
      customer: identifier.optional(),
    })
    .superRefine((r, ctx) => {
      if (r.op === 'upsert' && r.quantity === undefined) {
        ctx.addIssue({ code: 'custom', path: ['quantity'], message: 'is required on an upsert' });
      }
      if (r.revision > 1 && r.changedAt === undefined) {
        ctx.addIssue({ code: 'custom', path: ['changedAt'], message: 'is required from revision 2 on (when this revision happened)' });
      }
      const ordered = parseTimestamp(r.orderedAt);
      const changed = r.changedAt === undefined ? undefined : parseTimestamp(r.changedAt);
      if (ordered !== undefined && changed !== undefined && changed < ordered) {
        ctx.addIssue({ code: 'custom', path: ['changedAt'], message: 'must not be before orderedAt' });
      }
      if (ordered !== undefined) {
        const requested = Date.parse(`${r.requestedDate}T12:00:00Z`);
        const spanDays = Math.abs(requested - ordered) / DAY_MS;
        if (spanDays > limits.maxRequestedSpanDays + 1) {
          ctx.addIssue({
            code: 'custom',
            path: ['requestedDate'],
            message: `must be within ${limits.maxRequestedSpanDays} days of orderedAt`,
          });
        }
      }
    });
}

export type OrderLine = z.infer<ReturnType<typeof orderLineSchema>>;
