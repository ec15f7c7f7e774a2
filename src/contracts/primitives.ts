import { IANAZone } from 'luxon';
import { z } from 'zod';

// Bounds a real feed can break. They are settings (see src/config), fixed at start, never relative to the clock,
// so that a replay next year judges a record the same way as today.
export interface InputLimits {
  /** Largest quantity accepted on one record, in the item's base unit. */
  readonly maxQuantity: number;
  /** Earliest and latest timestamps accepted (RFC 3339). */
  readonly earliestTimestamp: string;
  readonly latestTimestamp: string;
  /** Largest span between an order's `orderedAt` date and its requested date, in days. */
  readonly maxRequestedSpanDays: number;
  /** Most weeks one baseline version may carry. */
  readonly maxBaselineWeeks: number;
}

export const DEFAULT_INPUT_LIMITS: InputLimits = Object.freeze({
  maxQuantity: 10_000_000,
  earliestTimestamp: '2000-01-01T00:00:00Z',
  latestTimestamp: '2100-01-01T00:00:00Z',
  maxRequestedSpanDays: 400,
  maxBaselineWeeks: 156,
});

export const ID_MAX_LENGTH = 64;
const ID_PATTERN = /^[A-Za-z0-9][A-Za-z0-9._:-]*$/;

// Identifiers reach pages, reports and Kafka keys (where `|` separates parts), so they keep to a safe alphabet.
export const identifier = z
  .string({ error: (iss) => (iss.input === undefined ? 'is required' : 'must be text') })
  .min(1, { error: 'must not be empty' })
  .max(ID_MAX_LENGTH, { error: `must be at most ${ID_MAX_LENGTH} characters` })
  .regex(ID_PATTERN, { error: 'may contain only letters, digits and . _ : - (starting with a letter or digit)' });

const DATE_PATTERN = /^(\d{4})-(\d{2})-(\d{2})$/;

export function isCalendarDate(value: string): boolean {
  const m = DATE_PATTERN.exec(value);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const t = new Date(Date.UTC(y, mo - 1, d));
  return t.getUTCFullYear() === y && t.getUTCMonth() === mo - 1 && t.getUTCDate() === d;
}

export const localDate = z
  .string({ error: (iss) => (iss.input === undefined ? 'is required' : 'must be a date written YYYY-MM-DD') })
  .refine(isCalendarDate, { error: 'must be a real calendar date written YYYY-MM-DD' })
  .refine((v) => v >= '2000-01-01' && v < '2100-01-01', { error: 'must lie between 2000-01-01 and 2099-12-31' });

const RFC3339 = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2})(\.\d{1,9})?(Z|[+-](\d{2}):(\d{2}))$/i;

export function parseTimestamp(value: string): number | undefined {
  const m = RFC3339.exec(value);
  if (!m) return undefined;
  if (!isCalendarDate(`${m[1]}-${m[2]}-${m[3]}`)) return undefined;
  if (Number(m[4]) > 23 || Number(m[5]) > 59 || Number(m[6]) > 59) return undefined;
  if (m[9] !== undefined && (Number(m[9]) > 23 || Number(m[10]) > 59)) return undefined;
  const ms = Date.parse(value);
  return Number.isFinite(ms) ? ms : undefined;
}

export function timestamp(limits: InputLimits) {
  const lo = Date.parse(limits.earliestTimestamp);
  const hi = Date.parse(limits.latestTimestamp);
  return z
    .string({ error: (iss) => (iss.input === undefined ? 'is required' : 'must be an RFC 3339 timestamp') })
    .superRefine((v, ctx) => {
      const ms = parseTimestamp(v);
      if (ms === undefined) {
        ctx.addIssue({ code: 'custom', message: 'must be an RFC 3339 timestamp with a time zone offset, e.g. 2026-03-02T08:15:00+01:00' });
      } else if (ms < lo || ms >= hi) {
        ctx.addIssue({ code: 'custom', message: `must lie between ${limits.earliestTimestamp} and ${limits.latestTimestamp}` });
      }
    });
}

export function quantity(limits: InputLimits) {
  return z
    .number({ error: (iss) => (iss.input === undefined ? 'is required' : 'must be a number') })
    .refine((v) => Number.isFinite(v), { error: 'must be a finite number' })
    .refine((v) => v >= 0, { error: 'must not be negative' })
    .refine((v) => v <= limits.maxQuantity, { error: `must not exceed the configured ceiling of ${limits.maxQuantity}` });
}

export const timeZone = z
  .string({ error: 'must be an IANA time zone name such as Europe/Berlin' })
  .max(64, { error: 'must be at most 64 characters' })
  .refine((v) => IANAZone.isValidZone(v), { error: 'must be an IANA time zone that exists, such as Europe/Berlin' });

export const WEEKDAYS = ['monday', 'tuesday', 'wednesday', 'thursday', 'friday', 'saturday', 'sunday'] as const;
export type Weekday = (typeof WEEKDAYS)[number];
export const weekday = z.enum(WEEKDAYS, { error: `must be one of ${WEEKDAYS.join(', ')}` });

export const clockTime = z
  .string({ error: 'must be a local time written HH:MM' })
  .regex(/^([01]\d|2[0-3]):[0-5]\d$/, { error: 'must be a local time written HH:MM (00:00 to 23:59)' });

export const positiveInt = z
  .number({ error: (iss) => (iss.input === undefined ? 'is required' : 'must be a whole number') })
  .int({ error: 'must be a whole number' })
  .min(1, { error: 'must be at least 1' })
  .max(2_147_483_647, { error: 'is too large' });

export const nonNegativeNumber = z.number().refine(Number.isFinite, { error: 'must be finite' }).refine((v) => v >= 0, { error: 'must not be negative' });
