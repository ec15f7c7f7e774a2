import { IANAZone } from 'luxon';
import type { BaselineVersion } from '../../../../src/contracts/baseline-version.ts';
import type { Location } from '../../../../src/contracts/location.ts';
import type { OrderLine } from '../../../../src/contracts/order-line.ts';
import type { Shipment } from '../../../../src/contracts/shipment.ts';
import { createRng, sampleNegBinomial, sampleNormal, samplePoisson, type Rng } from '../../../../src/stats/random.ts';

// Seeded generator of an invented beverage distributor's history: daily orders per series (negative-binomial or
// exact counts), split into lines booked by "early" customers one to two weeks ahead and by "late" customers a
// few days ahead, weekly baseline versions published every Monday morning, optional revisions, cancellations,
// shipments, shifts of the true level and re-plans of the baseline. Everything here is test data.

export const ZONE = 'Europe/Berlin';

export interface SeriesSpec {
  readonly item: string;
  /** Mean units per business day when demand equals the baseline. */
  readonly perDay: number;
  /** Day-level dispersion of the counts (Var = μ + φμ²); 'exact' makes every day exactly its mean. */
  readonly noise?: number | 'exact';
  /** Share of demand ordered by early customers, 7–13 days ahead of the requested date. */
  readonly earlyShare?: number;
  /** Mean units per order line. */
  readonly lineSize?: number;
  /** True demand over baseline in week w (0 = first generated week). */
  readonly level?: (week: number) => number;
  /** Baseline level (the planning cycle's view) for versions published in week v, for target week w. */
  readonly baselineLevel?: (publishedWeek: number, targetWeek: number) => number;
  /** Relative sd of the baseline's version-to-version wobble. */
  readonly wobble?: number;
  /** Share of lines later revised (quantity ±30%), moved by a day, or cancelled. */
  readonly reviseShare?: number;
  /** Extra one-off lines: [week, weekday (1-5), quantity, customer]. */
  readonly extraLines?: ReadonlyArray<readonly [number, number, number, string]>;
  /** No baseline at all. */
  readonly noBaseline?: boolean;
  /** First week with demand (earlier weeks have none; baselines still run from week 0). */
  readonly startWeek?: number;
  /** Shipped share of each week's orders (shipments only), e.g. short shipments during a stock-out. */
  readonly shipShare?: (week: number) => number;
}

export interface ScenarioSpec {
  readonly seed: number;
  /** Monday of the first generated week. */
  readonly start?: string;
  readonly weeks: number;
  readonly series: readonly SeriesSpec[];
  readonly withShipments?: boolean;
  readonly location?: string;
}

export type ScenarioRecord =
  | { readonly kind: 'order-line'; readonly knownMs: number; readonly record: OrderLine }
  | { readonly kind: 'shipment'; readonly knownMs: number; readonly record: Shipment }
  | { readonly kind: 'baseline-version'; readonly knownMs: number; readonly record: BaselineVersion };

export interface Scenario {
  readonly master: Location;
  readonly start: string;
  readonly records: ScenarioRecord[];
  /** True mean demand per series and week (units), for scoring. */
  readonly trueMean: Map<string, number[]>;
}

// Fast local-time helpers (luxon per record would dominate the run time): offsets memoised per quarter hour.
const zone = new IANAZone(ZONE);
const offsets = new Map<number, number>();
function offsetMinutes(ms: number): number {
  const q = Math.floor(ms / 900_000);
  let o = offsets.get(q);
  if (o === undefined) {
    o = zone.offset(q * 900_000);
    offsets.set(q, o);
  }
  return o;
}
/** Epoch ms of a local wall-clock time on a date (no wall time here falls in a DST gap: 06:00–17:00 only). */
function localMs(date: string, hour: number, minute = 0): number {
  const guess = Date.UTC(+date.slice(0, 4), +date.slice(5, 7) - 1, +date.slice(8, 10), hour, minute);
  return guess - offsetMinutes(guess - 3_600_000) * 60_000;
}
function isoOf(ms: number): string {
  const off = offsetMinutes(ms);
  const local = new Date(ms + off * 60_000).toISOString().slice(0, 19);
  const sign = off >= 0 ? '+' : '-';
  const a = Math.abs(off);
  return `${local}${sign}${String(Math.floor(a / 60)).padStart(2, '0')}:${String(a % 60).padStart(2, '0')}`;
}
const DAY = 86_400_000;
function addDays(date: string, days: number): string {
  return new Date(Date.parse(`${date}T00:00:00Z`) + days * DAY).toISOString().slice(0, 10);
}

export function masterData(location = 'DC-NORTH'): Location {
  return {
    location: location as Location['location'],
    timeZone: ZONE,
    closedWeekdays: ['saturday', 'sunday'],
    items: {},
  } as Location;
}

function hashText(text: string): number {
  let h = 2166136261;
  for (let i = 0; i < text.length; i++) h = Math.imul(h ^ text.charCodeAt(i), 16777619);
  return h >>> 0;
}

function count(rng: Rng, mean: number, noise: number | 'exact'): number {
  if (noise === 'exact') return mean;
  if (!(mean > 1e-9)) return 0;
  return noise > 0 ? sampleNegBinomial(rng, mean, noise) : samplePoisson(rng, mean);
}

export function generateScenario(spec: ScenarioSpec): Scenario {
  const start = spec.start ?? '2026-01-05';
  const master = masterData(spec.location);
  const loc = master.location;
  const records: ScenarioRecord[] = [];
  const trueMean = new Map<string, number[]>();
  let event = 0;
  const eventId = () => `ev-${spec.seed}-${++event}`;

  for (const s of spec.series) {
    // Each series draws from its own stream, so changing one series leaves the others' data untouched.
    const rng = createRng(spec.seed * 1_000_003 + hashText(s.item));
    const extraRng = createRng(spec.seed * 7_919 + hashText(s.item));
    const noise = s.noise ?? 0;
    const lineSize = s.lineSize ?? Math.max(1, s.perDay / 10);
    const early = s.earlyShare ?? 0;
    const means: number[] = [];
    let orderNo = 0;
    for (let w = 0; w < spec.weeks; w++) {
      const level = w < (s.startWeek ?? 0) ? 0 : s.level ? s.level(w) : 1;
      means.push(level * s.perDay * 5);
      for (let wd = 0; wd < 5; wd++) {
        const date = addDays(start, 7 * w + wd);
        // Early and late customers are separate customers: their daily counts are drawn independently.
        const lines: Array<{ q: number; early: boolean; customer?: string; extra?: boolean }> = [];
        for (const isEarly of [true, false]) {
          const share = isEarly ? early : 1 - early;
          if (share <= 0) continue;
          let qty = count(rng, level * s.perDay * share, noise);
          while (qty > 1e-9) {
            const q = noise === 'exact' ? Math.min(qty, lineSize) : Math.min(qty, Math.max(1, Math.round(lineSize * (0.5 + rng.next()))));
            lines.push({ q, early: isEarly });
            qty -= q;
          }
        }
        const extras = (s.extraLines ?? []).filter(([ew, ewd]) => ew === w && ewd === wd + 1);
        for (const [, , q, customer] of extras) lines.push({ q, early: true, customer, extra: true });
        for (const line of lines) {
          const r = line.extra ? extraRng : rng;
          const ahead = line.early ? 7 + (noise === 'exact' ? 3 : Math.floor(r.next() * 7)) : noise === 'exact' ? 1 : Math.floor(r.next() * 4);
          const orderedMs = localMs(addDays(date, -ahead), 9, 0) + 60_000 * (noise === 'exact' ? orderNo % 480 : Math.floor(r.next() * 480));
          const customer = line.customer ?? (line.early ? `C-EARLY-${1 + (orderNo % 3)}` : `C-LATE-${1 + (orderNo % 5)}`);
          orderNo++;
          const orderId = `O-${s.item}-${orderNo}`;
          const base: OrderLine = {
            eventId: eventId(),
            orderId,
            lineId: '1',
            revision: 1,
            op: 'upsert',
            location: loc,
            item: s.item as OrderLine['item'],
            quantity: line.q,
            orderedAt: isoOf(orderedMs),
            requestedDate: date,
            customer,
          } as OrderLine;
          records.push({ kind: 'order-line', knownMs: orderedMs, record: base });
          if (s.reviseShare && r.next() < s.reviseShare) {
            const changedMs = orderedMs + 3_600_000 * (2 + Math.floor(r.next() * 60));
            const u = r.next();
            const rev: OrderLine =
              u < 0.3
                ? { ...base, eventId: eventId(), revision: 2, op: 'cancel', quantity: undefined, changedAt: isoOf(changedMs) }
                : u < 0.6
                  ? { ...base, eventId: eventId(), revision: 2, quantity: Math.max(1, Math.round(line.q * (0.7 + 0.6 * r.next()))), changedAt: isoOf(changedMs) }
                  : { ...base, eventId: eventId(), revision: 2, requestedDate: addDays(date, u < 0.8 ? 1 : -1), changedAt: isoOf(changedMs) };
            records.push({ kind: 'order-line', knownMs: changedMs, record: rev });
          }
          if (spec.withShipments) {
            const shipMs = localMs(date, 15, 0);
            const shipped = line.q * (s.shipShare ? s.shipShare(w) : 1);
            if (shipped > 0) {
              records.push({
                kind: 'shipment',
                knownMs: shipMs,
                record: { eventId: eventId(), shipmentId: `S-${orderId}`, location: loc, item: s.item, quantity: shipped, shippedAt: isoOf(shipMs), orderId, lineId: '1' } as Shipment,
              });
            }
          }
        }
      }
    }
    trueMean.set(s.item, means);
    if (s.noBaseline) continue;
    // The planning cycle publishes a version every Monday at 06:00 covering this week and the next 12.
    for (let v = 0; v < spec.weeks + 5; v++) {
      const pubMs = localMs(addDays(start, 7 * v), 6, 0);
      const weeks = [];
      for (let t = v; t < v + 13; t++) {
        const lvl = s.baselineLevel ? s.baselineLevel(v, t) : 1;
        const wob = s.wobble ? 1 + s.wobble * sampleNormal(rng) : 1;
        weeks.push({ weekStart: addDays(start, 7 * t), quantity: Math.max(0, s.perDay * 5 * lvl * wob) });
      }
      records.push({
        kind: 'baseline-version',
        knownMs: pubMs,
        record: { eventId: eventId(), location: loc, item: s.item, version: v + 1, publishedAt: isoOf(pubMs), weeks } as BaselineVersion,
      });
    }
  }
  records.sort((a, b) => a.knownMs - b.knownMs || (a.record.eventId < b.record.eventId ? -1 : 1));
  return { master, start, records, trueMean };
}

/** Monday of generated week w, and a weekday in it (0 = Monday). */
export function dayOf(scenario: Scenario, week: number, weekday = 0): string {
  return addDays(scenario.start, 7 * week + weekday);
}

/** The close instant of a local date: 23:00 local, after the day's business. */
export function closeOf(date: string): number {
  return localMs(date, 23, 0);
}
