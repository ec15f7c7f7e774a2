import type { BaselineVersion } from '../../../../src/contracts/baseline-version.ts';
import type { Location } from '../../../../src/contracts/location.ts';
import type { OrderLine } from '../../../../src/contracts/order-line.ts';
import type { Shipment } from '../../../../src/contracts/shipment.ts';

// Hand-written records for small state tests (the invented distributor: DC-NORTH, Europe/Berlin, Monday weeks).

export const MASTER: Location = {
  location: 'DC-NORTH' as Location['location'],
  timeZone: 'Europe/Berlin',
  closedWeekdays: ['saturday', 'sunday'],
} as Location;

let n = 0;
export function line(over: Partial<OrderLine> & { orderId?: string }): OrderLine {
  n++;
  return {
    eventId: `e-${n}`,
    orderId: 'O-1',
    lineId: '1',
    revision: 1,
    op: 'upsert',
    location: 'DC-NORTH',
    item: 'SPARK-LEMON-330',
    quantity: 10,
    orderedAt: '2026-03-02T09:00:00+01:00',
    requestedDate: '2026-03-10',
    customer: 'BAR-CENTRAL',
    ...over,
  } as OrderLine;
}

export function shipment(over: Partial<Shipment>): Shipment {
  n++;
  return {
    eventId: `s-${n}`,
    shipmentId: 'SH-1',
    location: 'DC-NORTH',
    item: 'SPARK-LEMON-330',
    quantity: 10,
    shippedAt: '2026-03-10T14:00:00+01:00',
    ...over,
  } as Shipment;
}

export function baseline(over: Partial<BaselineVersion>): BaselineVersion {
  n++;
  return {
    eventId: `b-${n}`,
    location: 'DC-NORTH',
    item: 'SPARK-LEMON-330',
    version: 1,
    publishedAt: '2026-03-02T06:00:00+01:00',
    weeks: [
      { weekStart: '2026-03-02', quantity: 100 },
      { weekStart: '2026-03-09', quantity: 100 },
    ],
    ...over,
  } as BaselineVersion;
}
