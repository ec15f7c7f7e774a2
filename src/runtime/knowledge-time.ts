import { parseTimestamp } from '../contracts/primitives.ts';
import type { InputRecord, InputType } from '../contracts/records.ts';

/**
 * When a validated input record became known (DESIGN section 3): a line from `orderedAt`, a revision or cancel from
 * `changedAt`, a shipment from `shippedAt`, a baseline version from `publishedAt`. Day-closed and location records
 * carry no time of their own and are known from their arrival.
 */
export function knowledgeTimeMs<T extends InputType>(type: T, record: InputRecord<T>, arrivalMs: number): number {
  switch (type) {
    case 'order-line': {
      const r = record as InputRecord<'order-line'>;
      return parseTimestamp(r.changedAt ?? r.orderedAt)!;
    }
    case 'shipment':
      return parseTimestamp((record as InputRecord<'shipment'>).shippedAt)!;
    case 'baseline-version':
      return parseTimestamp((record as InputRecord<'baseline-version'>).publishedAt)!;
    default:
      return arrivalMs;
  }
}
