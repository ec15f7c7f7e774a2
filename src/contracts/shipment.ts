import { z } from 'zod';
import { locationId, itemId } from './ids.ts';
import { identifier, quantity, timestamp, type InputLimits } from './primitives.ts';

export function shipmentSchema(limits: InputLimits) {
  return z.object({
    eventId: identifier,
    shipmentId: identifier,
    location: locationId,
    item: itemId,
    quantity: quantity(limits),
    shippedAt: timestamp(limits),
    orderId: identifier.optional(),
    lineId: identifier.optional(),
  });
}

export type Shipment = z.infer<ReturnType<typeof shipmentSchema>>;
