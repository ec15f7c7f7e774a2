import { dayNumber, formatDay, isoWeekday } from '../calendar/day-number.ts';
import { localDayOf } from '../calendar/location-calendar.ts';
import { dayInWeek } from '../calendar/weeks.ts';
import type { BaselineVersion } from '../contracts/baseline-version.ts';
import { parseTimestamp, WEEKDAYS } from '../contracts/primitives.ts';
import { hash53 } from './hash.ts';
import { advanceWatermark, effectiveKnownMs, isTooLate, seriesOf, type ApplyOptions, type LocationState } from './location-state.ts';
import { noteKnown } from './knowledge-log.ts';
import { APPLIED, DUPLICATE, rejected, SUPERSEDED, type ApplyOutcome } from './outcome.ts';

/**
 * Applies one baseline version. Every version is kept with its knowledge time, so the baseline of a week as it was
 * known L weeks before stays recoverable; a week that does not start on the location's week start is rejected,
 * never silently re-read as another week.
 */
export function applyBaselineVersion(state: LocationState, baseline: BaselineVersion, options?: ApplyOptions): ApplyOutcome {
  if (baseline.location !== state.location) {
    return rejected('NEARCAST_INPUT_WRONG_LOCATION', 'location', `belongs to ${baseline.location}, not ${state.location}`);
  }
  const publishedMs = parseTimestamp(baseline.publishedAt);
  if (publishedMs === undefined) return rejected('NEARCAST_INPUT_INVALID', 'publishedAt', 'must be an RFC 3339 timestamp');
  const cal = state.calendar;
  const pairs: Array<[number, number]> = [];
  for (let i = 0; i < baseline.weeks.length; i++) {
    const w = baseline.weeks[i]!;
    let day: number;
    try {
      day = dayNumber(w.weekStart);
    } catch {
      return rejected('NEARCAST_INPUT_INVALID', `weeks.${i}.weekStart`, 'must be a real calendar date written YYYY-MM-DD');
    }
    if (dayInWeek(day, cal.weekStart) !== 0) {
      return rejected(
        'NEARCAST_INPUT_WEEK_MISALIGNED',
        `weeks.${i}.weekStart`,
        `${formatDay(day)} is a ${WEEKDAYS[isoWeekday(day) - 1]}; weeks at ${state.location} start on ${WEEKDAYS[cal.weekStart - 1]}`,
      );
    }
    if (!Number.isFinite(w.quantity) || w.quantity < 0) {
      return rejected('NEARCAST_INPUT_INVALID', `weeks.${i}.quantity`, 'must be a finite number ≥ 0');
    }
    pairs.push([day, w.quantity]);
  }
  if (isTooLate(state, publishedMs)) {
    return rejected(
      'NEARCAST_INPUT_TOO_LATE',
      'publishedAt',
      `baseline version ${baseline.version} is more than ${state.tooLateWeeks} weeks behind the location's event time`,
    );
  }
  const series = seriesOf(state, baseline.item);
  const eventHash = hash53(baseline.eventId);
  if (series.eventIds.has(eventHash) || series.baselines.some((b) => b.version === baseline.version)) return DUPLICATE;
  pairs.sort((a, b) => a[0] - b[0]);
  for (let i = 1; i < pairs.length; i++) {
    if (pairs[i]![0] === pairs[i - 1]![0]) return rejected('NEARCAST_INPUT_INVALID', 'weeks', `repeats week ${formatDay(pairs[i]![0])}`);
  }
  const knownMs = effectiveKnownMs(publishedMs, options);
  const entry = {
    version: baseline.version,
    eventHash,
    publishedMs,
    knownMs,
    knownDay: localDayOf(cal, knownMs),
    weeks: Int32Array.from(pairs.map((p) => p[0])),
    quantities: Float64Array.from(pairs.map((p) => p[1])),
  };
  const superseded = series.baselines.some((b) => b.version > baseline.version);
  series.baselines.push(entry);
  series.baselines.sort((a, b) => a.version - b.version);
  series.eventIds.add(eventHash);
  series.changeCount++;
  advanceWatermark(state, knownMs);
  noteKnown(state, entry.knownDay);
  return superseded ? SUPERSEDED : APPLIED;
}
