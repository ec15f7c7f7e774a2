import { addDays, instantOf } from './dates.ts';
import type { MonitoringSettings } from './settings.ts';

// Feed health from facts the runtime passes in (the core reads no clock): how long the location has been silent
// within its business hours of a given local date, up to a given instant.

export interface BusinessHours {
  readonly open: string;
  readonly close: string;
}

/** Business-hours minutes on `date` between the last record (or the opening, if later) and `untilMs`. */
export function silentBusinessMinutes(date: string, lastRecordMs: number | null, untilMs: number, timeZone: string, hours?: BusinessHours): number {
  const openMs = instantOf(date, hours?.open ?? '00:00', timeZone);
  const closeMs = hours ? instantOf(date, hours.close, timeZone) : instantOf(addDays(date, 1), '00:00', timeZone);
  const from = Math.max(openMs, lastRecordMs ?? -Infinity);
  const to = Math.min(closeMs, untilMs);
  return to > from ? (to - from) / 60_000 : 0;
}

/**
 * Minutes of silence that count as a stall: the configured stretch, or longer for a quiet feed whose typical rate
 * makes such a silence likely (Poisson arrivals: P[no record in t] = e^(−rate·t)).
 */
export function stallThresholdMinutes(recordsPerHour: number | undefined, s: MonitoringSettings['feed']): number {
  if (recordsPerHour === undefined || recordsPerHour <= 0) return s.stallMinutes;
  return Math.max(s.stallMinutes, (-Math.log(s.silenceProbability) / recordsPerHour) * 60);
}
