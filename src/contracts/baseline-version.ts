import { z } from 'zod';
import { locationId, itemId } from './ids.ts';
import { identifier, localDate, positiveInt, quantity, timestamp, type InputLimits } from './primitives.ts';

export function baselineVersionSchema(limits: InputLimits) {
  return z
    .object({
      eventId: identifier,
      location: locationId,
      item: itemId,
      version: positiveInt,
      publishedAt: timestamp(limits),
      weeks: z
        .array(z.object({ weekStart: localDate, quantity: quantity(limits) }), { error: 'must be a list of weeks' })
        .min(1, { error: 'must hold at least one week' })
        .max(limits.maxBaselineWeeks, { error: `must hold at most ${limits.maxBaselineWeeks} weeks` }),
    })
    .superRefine((r, ctx) => {
      const seen = new Set<string>();
      r.weeks.forEach((w, i) => {
        if (seen.has(w.weekStart)) {
          ctx.addIssue({ code: 'custom', path: ['weeks', i, 'weekStart'], message: `repeats week ${w.weekStart}` });
        }
        seen.add(w.weekStart);
      });
    });
}

export type BaselineVersion = z.infer<ReturnType<typeof baselineVersionSchema>>;
