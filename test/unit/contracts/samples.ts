// Valid records of every input type, from our own invented beverage-distribution scenario.
export const goodOrderLine = {
  eventId: 'ev-1001',
  orderId: 'SO-2026-0001',
  lineId: '1',
  revision: 1,
  op: 'upsert',
  location: 'DC-NORTH',
  item: 'SPARK-LEMON-330',
  quantity: 240,
  orderedAt: '2026-03-02T08:15:00+01:00',
  requestedDate: '2026-03-05',
  customer: 'CUST-HARBOUR-MARKETS',
};

export const goodShipment = {
  eventId: 'ev-2001',
  shipmentId: 'SH-77',
  location: 'DC-NORTH',
  item: 'SPARK-LEMON-330',
  quantity: 240,
  shippedAt: '2026-03-05T14:00:00+01:00',
  orderId: 'SO-2026-0001',
  lineId: '1',
};

export const goodBaseline = {
  eventId: 'ev-3001',
  location: 'DC-NORTH',
  item: 'SPARK-LEMON-330',
  version: 4,
  publishedAt: '2026-02-27T18:00:00Z',
  weeks: [
    { weekStart: '2026-03-02', quantity: 1200 },
    { weekStart: '2026-03-09', quantity: 1250 },
  ],
};

export const goodDayClosed = { eventId: 'ev-4001', location: 'DC-NORTH', date: '2026-03-05' };

export const goodLocation = {
  location: 'DC-NORTH',
  timeZone: 'Europe/Berlin',
  weekStart: 'monday',
  closedWeekdays: ['sunday'],
  holidays: [{ date: '2026-04-03', kind: 'closed', name: 'Good Friday' }],
  businessHours: { open: '06:00', close: '22:00' },
  dayCloseDeadline: '02:00',
  items: { 'SPARK-LEMON-330': { unitPrice: 0.62, casePack: 24 } },
};
