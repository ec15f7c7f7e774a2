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
export const ID_PATTERN = /^[A-Za-z0-9][A-Za-z0-9._:-]*$/;

// Identifiers reach pages, reports and Kafka keys (where `|` separates parts), so they keep to a safe alphabet.
export const identifier = z
  .string({ error: (iss) => (iss.input === undefined ? 'is required' : 'must be text') })
  .min(1, { error: 'must not be empty' })
  .max(ID_MAX_LENGTH, { error: `must be at most ${ID_MAX_LENGTH} characters` })
  .regex(ID_PATTERN, { error: 'may contain only letters, digits and . _ : - (starting with a letter or digit)' });

// Dates and timestamps are checked on every record (several times: schema, knowledge time, sensing), so they are
// read character by character instead of by regular expression, date objects and a second parse of the date part.

/** Value of the `n` ASCII digits at `at`, or -1 if any of them is not a digit 0-9. */
function digitsAt(text: string, at: number, n: number): number {
  let v = 0;
  for (let i = at; i < at + n; i++) {
    const c = text.charCodeAt(i) - 48;
    if (c < 0 || c > 9) return -1;
    v = v * 10 + c;
  }
  return v;
}

const DAYS_IN_MONTH = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

/**
 * A real day of the proleptic Gregorian calendar. Years below 100 are refused, as they always were: the check was
 * once made with Date.UTC, which reads such a year as 19yy.
 */
function isCalendarDay(y: number, mo: number, d: number): boolean {
  if (y < 100 || mo < 1 || mo > 12 || d < 1) return false;
  const leap = y % 4 === 0 && (y % 100 !== 0 || y % 400 === 0);
  return d <= (mo === 2 && leap ? 29 : DAYS_IN_MONTH[mo - 1]!);
}

/** `YYYY-MM-DD` naming a real calendar day. */
export function isCalendarDate(value: string): boolean {
  if (value.length !== 10 || value.charCodeAt(4) !== 45 || value.charCodeAt(7) !== 45) return false;
  return isCalendarDay(digitsAt(value, 0, 4), digitsAt(value, 5, 2), digitsAt(value, 8, 2));
}

export const localDate = z
  .string({ error: (iss) => (iss.input === undefined ? 'is required' : 'must be a date written YYYY-MM-DD') })
  .refine(isCalendarDate, { error: 'must be a real calendar date written YYYY-MM-DD' })
  .refine((v) => v >= '2000-01-01' && v < '2100-01-01', { error: 'must lie between 2000-01-01 and 2099-12-31' });

const MINUTE_MS = 60_000;

/**
 * Epoch ms of an RFC 3339 timestamp (`YYYY-MM-DDTHH:MM:SS[.fraction]` then `Z` or `±HH:MM`, letters in either
 * case), or undefined if it is not one or names no real day and time.
 */
export function parseTimestamp(value: string): number | undefined {
  const n = value.length;
  if (n < 20 || value.charCodeAt(4) !== 45 || value.charCodeAt(7) !== 45 || (value.charCodeAt(10) | 32) !== 116) return undefined;
  if (value.charCodeAt(13) !== 58 || value.charCodeAt(16) !== 58) return undefined;
  const y = digitsAt(value, 0, 4);
  const mo = digitsAt(value, 5, 2);
  const d = digitsAt(value, 8, 2);
  const h = digitsAt(value, 11, 2);
  const mi = digitsAt(value, 14, 2);
  const s = digitsAt(value, 17, 2);
  if (!isCalendarDay(y, mo, d) || h < 0 || h > 23 || mi < 0 || mi > 59 || s < 0 || s > 59) return undefined;
  let at = 19;
  let fraction = '';
  if (value.charCodeAt(at) === 46) {
    let end = at + 1;
    while (end < n && end - at <= 9 && digitsAt(value, end, 1) >= 0) end++;
    if (end === at + 1 || (end < n && digitsAt(value, end, 1) >= 0)) return undefined; // no digit, or more than 9
    fraction = value.slice(at + 1, end);
    at = end;
  }
  let offsetMin = 0;
  if (at === n - 1 && (value.charCodeAt(at) | 32) === 122) {
    // Z
  } else if (at === n - 6 && (value.charCodeAt(at) === 43 || value.charCodeAt(at) === 45) && value.charCodeAt(at + 3) === 58) {
    const oh = digitsAt(value, at + 1, 2);
    const om = digitsAt(value, at + 4, 2);
    if (oh < 0 || oh > 23 || om < 0 || om > 59) return undefined;
    offsetMin = (value.charCodeAt(at) === 45 ? -1 : 1) * (oh * 60 + om);
  } else {
    return undefined;
  }
  // Milliseconds are the first three fraction digits; finer digits are dropped, as Date.parse drops them.
  const ms = fraction === '' ? 0 : Number(fraction.slice(0, 3).padEnd(3, '0'));
  const t = Date.UTC(y, mo - 1, d, h, mi, s, ms) - offsetMin * MINUTE_MS;
  return Number.isFinite(t) ? t : undefined;
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
