import { localDayOf } from '../calendar/location-calendar.ts';
import { parseTimestamp } from '../contracts/primitives.ts';
import type { Shipment } from '../contracts/shipment.ts';
import { hash53, lineKeyHash } from './hash.ts';
import { advanceWatermark, effectiveKnownMs, isTooLate, seriesOf, type ApplyOptions, type LocationState } from './location-state.ts';
import { noteKnown } from './knowledge-log.ts';
import { APPLIED, DUPLICATE, rejected, type ApplyOutcome } from './outcome.ts';

/** Applies one shipment; idempotent by shipmentId (a second record with the same id changes nothing). */
export function applyShipment(state: LocationState, shipment: Shipment, options?: ApplyOptions): ApplyOutcome {
  if (shipment.location !== state.location) {
    return rejected('NEARCAST_INPUT_WRONG_LOCATION', 'location', `belongs to ${shipment.location}, not ${state.location}`);
  }
  const shippedMs = parseTimestamp(shipment.shippedAt);
  if (shippedMs === undefined) return rejected('NEARCAST_INPUT_INVALID', 'shippedAt', 'must be an RFC 3339 timestamp');
  if (!Number.isFinite(shipment.quantity) || shipment.quantity < 0) {
    return rejected('NEARCAST_INPUT_INVALID', 'quantity', 'must be a finite number ≥ 0');
  }
  if (isTooLate(state, shippedMs)) {
    return rejected(
      'NEARCAST_INPUT_TOO_LATE',
      'shippedAt',
      `shipment ${shipment.shipmentId} is more than ${state.tooLateWeeks} weeks behind the location's event time`,
    );
  }
  const series = seriesOf(state, shipment.item);
  const eventHash = hash53(shipment.eventId);
  const shipmentHash = hash53(shipment.shipmentId);
  if (series.eventIds.has(eventHash) || series.shipmentIds.has(shipmentHash)) return DUPLICATE;
  const knownMs = effectiveKnownMs(shippedMs, options);
  const knownDay = localDayOf(state.calendar, knownMs);
  series.shipments.push({
    shipmentHash,
    eventHash,
    knownMs,
    knownDay,
    shipDay: localDayOf(state.calendar, shippedMs),
    quantity: shipment.quantity,
    lineHash: shipment.orderId !== undefined && shipment.lineId !== undefined ? lineKeyHash(shipment.orderId, shipment.lineId) : -1,
  });
  series.shipmentIds.add(shipmentHash);
  series.eventIds.add(eventHash);
  series.changeCount++;
  advanceWatermark(state, knownMs);
  noteKnown(state, knownDay);
  return APPLIED;
}
