import type { OrderLine } from './order-line.ts';
import { ID_MAX_LENGTH, ID_PATTERN, isCalendarDate, parseTimestamp, type InputLimits } from './primitives.ts';
import type { Shipment } from './shipment.ts';

// Order lines and shipments arrive by the ten thousand, and running their zod schemas was most of the ingest
// stage's validation time. These checks apply the very rules of order-line.ts and shipment.ts in plain code, for
// the common case of a record that passes: they return the record as its schema would (known fields only, in the
// schema's order) or undefined as soon as anything is off, and then the schema itself judges the record, so a
// refused record gets the schema's issues word for word. They may refuse more than the schema (the schema then
// accepts), never less; test/unit/contracts/record-fast-checks.test.ts holds both to that on generated records.
// A rule added to either schema must be added here too.

const DAY_MS = 86_400_000;

type Fields = Record<string, unknown>;

function isIdentifier(v: unknown): v is string {
  return typeof v === 'string' && v.length >= 1 && v.length <= ID_MAX_LENGTH && ID_PATTERN.test(v);
}

function timestampMs(v: unknown, lo: number, hi: number): number | undefined {
  if (typeof v !== 'string') return undefined;
  const ms = parseTimestamp(v);
  return ms !== undefined && ms >= lo && ms < hi ? ms : undefined;
}

function isQuantity(v: unknown, limits: InputLimits): v is number {
  return typeof v === 'number' && Number.isFinite(v) && v >= 0 && v <= limits.maxQuantity;
}

function isLocalDate(v: unknown): v is string {
  return typeof v === 'string' && isCalendarDate(v) && v >= '2000-01-01' && v < '2100-01-01';
}

/** An optional field the record leaves out: absent. Present as undefined, the schema decides. */
const absent = (r: Fields, key: string) => !(key in r);

export type FastCheck<T> = (record: Fields) => T | undefined;

export function fastOrderLineCheck(limits: InputLimits): FastCheck<OrderLine> {
  const lo = Date.parse(limits.earliestTimestamp);
  const hi = Date.parse(limits.latestTimestamp);
  return (r) => {
    const { eventId, orderId, lineId, revision, op, location, item, quantity, orderedAt, changedAt, requestedDate, customer } = r;
    if (!isIdentifier(eventId) || !isIdentifier(orderId) || !isIdentifier(lineId) || !isIdentifier(location) || !isIdentifier(item)) return undefined;
    if (typeof revision !== 'number' || !Number.isInteger(revision) || revision < 1 || revision > 2_147_483_647) return undefined;
    if (op !== 'upsert' && op !== 'cancel') return undefined;
    if (quantity === undefined ? !absent(r, 'quantity') || op === 'upsert' : !isQuantity(quantity, limits)) return undefined;
    const ordered = timestampMs(orderedAt, lo, hi);
    if (ordered === undefined || !isLocalDate(requestedDate)) return undefined;
    let changed: number | undefined;
    if (changedAt === undefined) {
      if (!absent(r, 'changedAt') || revision > 1) return undefined;
    } else {
      changed = timestampMs(changedAt, lo, hi);
      if (changed === undefined || changed < ordered) return undefined;
    }
    if (customer === undefined ? !absent(r, 'customer') : !isIdentifier(customer)) return undefined;
    const requested = Date.parse(`${requestedDate}T12:00:00Z`);
    if (!(Math.abs(requested - ordered) / DAY_MS <= limits.maxRequestedSpanDays + 1)) return undefined;
    const out: Fields = { eventId, orderId, lineId, revision, op, location, item };
    if (quantity !== undefined) out.quantity = quantity;
    out.orderedAt = orderedAt;
    if (changedAt !== undefined) out.changedAt = changedAt;
    out.requestedDate = requestedDate;
    if (customer !== undefined) out.customer = customer;
    return out as OrderLine;
  };
}

export function fastShipmentCheck(limits: InputLimits): FastCheck<Shipment> {
  const lo = Date.parse(limits.earliestTimestamp);
  const hi = Date.parse(limits.latestTimestamp);
  return (r) => {
    const { eventId, shipmentId, location, item, quantity, shippedAt, orderId, lineId } = r;
    if (!isIdentifier(eventId) || !isIdentifier(shipmentId) || !isIdentifier(location) || !isIdentifier(item)) return undefined;
    if (!isQuantity(quantity, limits) || timestampMs(shippedAt, lo, hi) === undefined) return undefined;
    if (orderId === undefined ? !absent(r, 'orderId') : !isIdentifier(orderId)) return undefined;
    if (lineId === undefined ? !absent(r, 'lineId') : !isIdentifier(lineId)) return undefined;
    const out: Fields = { eventId, shipmentId, location, item, quantity, shippedAt };
    if (orderId !== undefined) out.orderId = orderId;
    if (lineId !== undefined) out.lineId = lineId;
    return out as Shipment;
  };
}
