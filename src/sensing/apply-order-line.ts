import { localDayOf } from '../calendar/location-calendar.ts';
import { dayNumber } from '../calendar/day-number.ts';
import type { OrderLine } from '../contracts/order-line.ts';
import { parseTimestamp } from '../contracts/primitives.ts';
import { hash53, lineKeyHash } from './hash.ts';
import { advanceWatermark, customerIndexOf, effectiveKnownMs, isTooLate, seriesOf, type ApplyOptions, type LocationState } from './location-state.ts';
import { noteKnown } from './knowledge-log.ts';
import { APPLIED, DUPLICATE, rejected, SUPERSEDED, type ApplyOutcome } from './outcome.ts';
import { hasRevision, highestRevision } from './series-state.ts';

/**
 * Applies one order-line revision. An upsert carries the line's full new state, a cancel zeroes it; the highest
 * revision decides the line whatever the arrival order, and every revision is kept with its knowledge time so the
 * order book as known on any past day stays recoverable.
 */
export function applyOrderLine(state: LocationState, line: OrderLine, options?: ApplyOptions): ApplyOutcome {
  if (line.location !== state.location) {
    return rejected('NEARCAST_INPUT_WRONG_LOCATION', 'location', `belongs to ${line.location}, not ${state.location}`);
  }
  const orderedMs = parseTimestamp(line.orderedAt);
  if (orderedMs === undefined) return rejected('NEARCAST_INPUT_INVALID', 'orderedAt', 'must be an RFC 3339 timestamp');
  let recordMs = orderedMs;
  if (line.changedAt !== undefined) {
    const changed = parseTimestamp(line.changedAt);
    if (changed === undefined) return rejected('NEARCAST_INPUT_INVALID', 'changedAt', 'must be an RFC 3339 timestamp');
    recordMs = Math.max(changed, orderedMs);
  } else if (line.revision > 1) {
    return rejected('NEARCAST_INPUT_INVALID', 'changedAt', 'is required from revision 2 on');
  }
  let requestedDay: number;
  try {
    requestedDay = dayNumber(line.requestedDate);
  } catch {
    return rejected('NEARCAST_INPUT_INVALID', 'requestedDate', 'must be a real calendar date written YYYY-MM-DD');
  }
  const quantity = line.op === 'cancel' ? 0 : line.quantity;
  if (quantity === undefined || !Number.isFinite(quantity) || quantity < 0) {
    return rejected('NEARCAST_INPUT_INVALID', 'quantity', 'must be a finite number ≥ 0 on an upsert');
  }
  if (isTooLate(state, recordMs)) {
    return rejected(
      'NEARCAST_INPUT_TOO_LATE',
      line.changedAt !== undefined ? 'changedAt' : 'orderedAt',
      `revision ${line.revision} of order ${line.orderId} line ${line.lineId} is more than ${state.tooLateWeeks} weeks behind the location's event time`,
    );
  }
  const series = seriesOf(state, line.item);
  const eventHash = hash53(line.eventId);
  if (series.eventIds.has(eventHash)) return DUPLICATE;
  const lineHash = lineKeyHash(line.orderId, line.lineId);
  if (hasRevision(series, lineHash, line.revision)) return DUPLICATE;

  const knownMs = effectiveKnownMs(recordMs, options);
  const knownDay = localDayOf(state.calendar, knownMs);
  const superseded = highestRevision(series, lineHash) > line.revision;
  const row = series.lines.push({
    lineHash,
    revision: line.revision,
    knownMs,
    knownDay,
    orderedDay: localDayOf(state.calendar, orderedMs),
    requestedDay,
    quantity,
    customer: customerIndexOf(state, line.customer),
    eventHash,
    prevSameLine: series.lineHeads.get(lineHash),
  });
  series.lineHeads.set(lineHash, row);
  series.eventIds.add(eventHash);
  series.changeCount++;
  advanceWatermark(state, knownMs);
  noteKnown(state, knownDay);
  return superseded ? SUPERSEDED : APPLIED;
}
