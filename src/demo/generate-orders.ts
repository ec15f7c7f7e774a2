import { IANAZone } from 'luxon';
import { createRng, sampleInteger, sampleNegBinomial, type Rng } from '../stats/random.ts';
import { addDays, isBusinessDay, localTimeMs } from '../runtime/local-day.ts';
import type { DemoCentre, DemoItem } from './catalogue.ts';
import { expectedDemand } from './demand-model.ts';
import type { Scenario } from './scenario.ts';

// Order lines (with revisions and cancellations) and their shipments for one series. Demand is drawn per requested
// date and customer (negative binomial around the true expectation); each customer books a habitual number of days
// ahead; a line may later be revised or cancelled; what survives ships on its requested date.

export interface Timed<T> {
  readonly knownMs: number;
  readonly record: T;
}

export type OrderLineRecord = Record<string, unknown> & { eventId: string };
export type ShipmentRecord = Record<string, unknown> & { eventId: string };

const DISPERSION = 0.15; // day-level over-dispersion of a customer's orders (our choice)
const FUTURE_DAYS = 42; // bookings for up to six weeks past the cut can already exist

const zones = new Map<string, IANAZone>();
const localTimes = new Map<string, number>();

/** RFC 3339 with the zone's offset at that instant, e.g. 2026-07-21T10:00:00+01:00. */
export function stamp(ms: number, timeZone: string): string {
  let zone = zones.get(timeZone);
  if (!zone) zones.set(timeZone, (zone = IANAZone.create(timeZone)));
  const offset = zone.offset(ms);
  const local = new Date(ms + offset * 60_000).toISOString().slice(0, 19);
  const sign = offset < 0 ? '-' : '+';
  const abs = Math.abs(offset);
  return `${local}${sign}${String(Math.floor(abs / 60)).padStart(2, '0')}:${String(abs % 60).padStart(2, '0')}`;
}

/** Local clock time on a date, memoised (the generator asks for the same few times of every day). */
export function localTime(date: string, hhmm: string, timeZone: string): number {
  const key = `${date}|${hhmm}|${timeZone}`;
  let ms = localTimes.get(key);
  if (ms === undefined) localTimes.set(key, (ms = localTimeMs(date, hhmm, timeZone)));
  return ms;
}

/** yymmdd: keeps ids under the 64-character limit. */
function compact(date: string): string {
  return date.slice(2).replaceAll('-', '');
}

/** A deterministic seed per series, so adding an item does not reshuffle the others. */
export function seriesSeed(seed: number, location: string, item: string): number {
  let h = seed >>> 0;
  for (const c of `${location}|${item}`) h = Math.imul(h ^ c.charCodeAt(0), 0x01000193) >>> 0;
  return h;
}

function businessDayOnOrBefore(centre: DemoCentre, date: string): string {
  let d = date;
  for (let i = 0; i < 10 && !isBusinessDay(centre.master, d); i++) d = addDays(d, -1);
  return d;
}

function timeInHours(rng: Rng, centre: DemoCentre, date: string, fromShare = 0, toShare = 1): number {
  const hours = centre.master.businessHours ?? { open: '08:00', close: '18:00' };
  const open = localTime(date, hours.open, centre.master.timeZone);
  const close = localTime(date, hours.close, centre.master.timeZone);
  const span = close - open;
  return open + Math.floor((fromShare + rng.next() * (toShare - fromShare)) * span / 60_000) * 60_000;
}

export interface SeriesHistory {
  readonly orders: Timed<OrderLineRecord>[];
  readonly shipments: Timed<ShipmentRecord>[];
}

export function generateSeries(scenario: Scenario, centre: DemoCentre, item: DemoItem, level: number, codes: { centre: string; item: number }): SeriesHistory {
  const rng = createRng(seriesSeed(scenario.seed, centre.master.location, item.item));
  const tz = centre.master.timeZone;
  const location = centre.master.location;
  const cutMs = Date.parse(scenario.cutAt);
  const orders: Timed<OrderLineRecord>[] = [];
  const shipments: Timed<ShipmentRecord>[] = [];
  const su = scenario.stockUp;
  const stocking = location === su.location && su.items.includes(item.item);

  const placeLine = (customer: string, quantity: number, requested: string, orderedDate: string, tag: string) => {
    const orderedMs = timeInHours(rng, centre, orderedDate, 0, orderedDate === requested ? 0.5 : 1);
    if (orderedMs >= cutMs) return;
    const customerCode = centre.customers.findIndex((c) => c.id === customer);
    const orderId = `O-${codes.centre}${customerCode}-${compact(orderedDate)}-${tag}`;
    const lineId = String(codes.item);
    const base = { orderId, lineId, location, item: item.item, customer, requestedDate: requested, orderedAt: stamp(orderedMs, tz) };
    orders.push({ knownMs: orderedMs, record: { eventId: `${orderId}-${lineId}-r1`, revision: 1, op: 'upsert', quantity, ...base } });
    let final = quantity;
    let cancelled = false;
    const deliverMs = localTime(requested, centre.master.businessHours?.open ?? '08:00', tz);
    const roll = rng.next();
    if (roll < 0.15 && deliverMs - orderedMs > 3_600_000) {
      const changedMs = orderedMs + 3_600_000 + Math.floor((rng.next() * (deliverMs - orderedMs - 3_600_000)) / 60_000) * 60_000;
      if (changedMs < cutMs) {
        cancelled = roll < 0.03;
        final = cancelled ? 0 : Math.max(1, Math.round(quantity * (0.6 + 0.8 * rng.next())));
        orders.push({
          knownMs: changedMs,
          record: { eventId: `${orderId}-${lineId}-r2`, revision: 2, op: cancelled ? 'cancel' : 'upsert', ...(cancelled ? {} : { quantity: final }), ...base, changedAt: stamp(changedMs, tz) },
        });
      }
    }
    if (cancelled || final <= 0) return;
    const shippedMs = timeInHours(rng, centre, requested, 0, 0.4);
    if (shippedMs >= cutMs) return;
    const shortShip = rng.next() < 0.04;
    const shipped = shortShip ? Math.floor(final * (0.8 + 0.15 * rng.next())) : final;
    shipments.push({
      knownMs: shippedMs,
      record: { eventId: `S-${orderId}-${lineId}`, shipmentId: `S-${orderId}-${lineId}`, location, item: item.item, quantity: shipped, shippedAt: stamp(shippedMs, tz), orderId, lineId },
    });
  };

  const lastRequested = addDays(scenario.cutAt.slice(0, 10), FUTURE_DAYS);
  for (let r = scenario.start; r <= lastRequested; r = addDays(r, 1)) {
    const mu = expectedDemand(scenario, centre, item, level, r);
    if (mu === 0) continue;
    for (const c of centre.customers) {
      let muC = mu * c.share;
      if (stocking && c.id === su.customer && r >= su.priceChangeOn) muC *= su.afterShare;
      const q = sampleNegBinomial(rng, muC, DISPERSION);
      if (q === 0) continue;
      const lead = Math.max(0, c.bookAheadDays + sampleInteger(rng, -1, 2));
      placeLine(c.id, q, r, businessDayOnOrBefore(centre, addDays(r, -lead)), compact(r));
    }
  }

  if (stocking) {
    // The stock-up: extra lines ordered in the days before, for the week before the price change.
    const usualWeek = level * (centre.customers.find((c) => c.id === su.customer)?.share ?? 0);
    const days: string[] = [];
    for (let r = su.requestedFrom; r <= su.requestedTo; r = addDays(r, 1)) if (isBusinessDay(centre.master, r)) days.push(r);
    const orderDays: string[] = [];
    for (let d = su.orderedFrom; d <= su.orderedTo; d = addDays(d, 1)) if (isBusinessDay(centre.master, d)) orderDays.push(d);
    days.forEach((r, i) => {
      const q = Math.round((usualWeek * su.extraWeeks) / days.length);
      if (q > 0) placeLine(su.customer, q, r, orderDays[i % orderDays.length]!, `X${compact(r)}`);
    });
  }
  return { orders, shipments };
}
