import { describe, expect, it } from 'vitest';
import { RecordValidator, describeIssues, type Issue } from '../../../src/contracts/validate.ts';
import type { InputType } from '../../../src/contracts/records.ts';
import { DEFAULT_INPUT_LIMITS } from '../../../src/contracts/primitives.ts';
import { goodBaseline, goodDayClosed, goodLocation, goodOrderLine, goodShipment } from './samples.ts';

const validator = new RecordValidator();
const long = 'X'.repeat(65);

type Case = [description: string, record: Record<string, unknown>, expectedPath: string];

function expectRejected(type: InputType, record: unknown, path: string): Issue[] {
  const result = validator.check(type, record);
  expect(result.ok, `expected rejection at ${path}`).toBe(false);
  if (result.ok) return [];
  expect(result.issues.map((i) => i.path)).toContain(path);
  for (const issue of result.issues) expect(issue.message.length).toBeGreaterThan(3);
  return [...result.issues];
}

const without = (r: Record<string, unknown>, key: string) => Object.fromEntries(Object.entries(r).filter(([k]) => k !== key));

describe('valid records of every input type are accepted', () => {
  it.each<[InputType, unknown]>([
    ['order-line', goodOrderLine],
    ['order-line', { ...goodOrderLine, revision: 2, changedAt: '2026-03-03T09:00:00+01:00', op: 'cancel', quantity: undefined }],
    ['shipment', goodShipment],
    ['baseline-version', goodBaseline],
    ['day-closed', goodDayClosed],
    ['location', goodLocation],
    ['location', { location: 'DC-COAST', timeZone: 'Europe/Lisbon' }],
  ])('%s', (type, record) => {
    const result = validator.check(type, record);
    expect(result.ok ? 'ok' : describeIssues(result.issues)).toBe('ok');
  });
});

describe('an order line is rejected with the field path and reason', () => {
  const cases: Case[] = [
    ['quantity as text', { ...goodOrderLine, quantity: '240' }, 'quantity'],
    ['negative quantity', { ...goodOrderLine, quantity: -1 }, 'quantity'],
    ['NaN quantity', { ...goodOrderLine, quantity: Number.NaN }, 'quantity'],
    ['infinite quantity', { ...goodOrderLine, quantity: Number.POSITIVE_INFINITY }, 'quantity'],
    ['quantity above the ceiling', { ...goodOrderLine, quantity: 1e12 }, 'quantity'],
    ['missing eventId', without(goodOrderLine, 'eventId'), 'eventId'],
    ['missing requestedDate', without(goodOrderLine, 'requestedDate'), 'requestedDate'],
    ['timestamp without offset', { ...goodOrderLine, orderedAt: '2026-03-02T08:15:00' }, 'orderedAt'],
    ['absurd year', { ...goodOrderLine, orderedAt: '2199-03-02T08:15:00Z' }, 'orderedAt'],
    ['impossible date', { ...goodOrderLine, requestedDate: '2026-02-30' }, 'requestedDate'],
    ['requested date far from orderedAt', { ...goodOrderLine, requestedDate: '2028-03-05' }, 'requestedDate'],
    ['oversized item id', { ...goodOrderLine, item: long }, 'item'],
    ['unsafe characters in location', { ...goodOrderLine, location: 'DC<script>' }, 'location'],
    ['unknown op', { ...goodOrderLine, op: 'delete' }, 'op'],
    ['revision zero', { ...goodOrderLine, revision: 0 }, 'revision'],
    ['fractional revision', { ...goodOrderLine, revision: 1.5 }, 'revision'],
    ['revision 2 without changedAt', { ...goodOrderLine, revision: 2 }, 'changedAt'],
    ['changedAt before orderedAt', { ...goodOrderLine, revision: 2, changedAt: '2026-03-01T08:00:00+01:00' }, 'changedAt'],
    ['upsert without quantity', without(goodOrderLine, 'quantity'), 'quantity'],
  ];
  it.each(cases)('%s', (_d, record, path) => {
    expectRejected('order-line', record, path);
  });
});

describe('a shipment is rejected with the field path and reason', () => {
  const cases: Case[] = [
    ['quantity as boolean', { ...goodShipment, quantity: true }, 'quantity'],
    ['negative quantity', { ...goodShipment, quantity: -5 }, 'quantity'],
    ['NaN quantity', { ...goodShipment, quantity: Number.NaN }, 'quantity'],
    ['infinite quantity', { ...goodShipment, quantity: Number.NEGATIVE_INFINITY }, 'quantity'],
    ['missing shipmentId', without(goodShipment, 'shipmentId'), 'shipmentId'],
    ['missing shippedAt', without(goodShipment, 'shippedAt'), 'shippedAt'],
    ['date-only shippedAt', { ...goodShipment, shippedAt: '2026-03-05' }, 'shippedAt'],
    ['absurd year', { ...goodShipment, shippedAt: '1899-01-01T00:00:00Z' }, 'shippedAt'],
    ['impossible hour', { ...goodShipment, shippedAt: '2026-03-05T25:00:00Z' }, 'shippedAt'],
    ['oversized shipment id', { ...goodShipment, shipmentId: long }, 'shipmentId'],
    ['empty item', { ...goodShipment, item: '' }, 'item'],
    ['location as number', { ...goodShipment, location: 7 }, 'location'],
  ];
  it.each(cases)('%s', (_d, record, path) => {
    expectRejected('shipment', record, path);
  });
});

describe('a baseline version is rejected with the field path and reason', () => {
  const week = (q: unknown, w = '2026-03-02') => ({ ...goodBaseline, weeks: [{ weekStart: w, quantity: q }] });
  const cases: Case[] = [
    ['week quantity as text', week('1200'), 'weeks.0.quantity'],
    ['negative week quantity', week(-1), 'weeks.0.quantity'],
    ['NaN week quantity', week(Number.NaN), 'weeks.0.quantity'],
    ['infinite week quantity', week(Number.POSITIVE_INFINITY), 'weeks.0.quantity'],
    ['impossible week start', week(10, '2026-13-01'), 'weeks.0.weekStart'],
    ['repeated week', { ...goodBaseline, weeks: [goodBaseline.weeks[0], goodBaseline.weeks[0]] }, 'weeks.1.weekStart'],
    ['no weeks', { ...goodBaseline, weeks: [] }, 'weeks'],
    ['weeks not a list', { ...goodBaseline, weeks: { '2026-03-02': 10 } }, 'weeks'],
    ['missing version', without(goodBaseline, 'version'), 'version'],
    ['version as text', { ...goodBaseline, version: 'v4' }, 'version'],
    ['publishedAt without offset', { ...goodBaseline, publishedAt: '2026-02-27 18:00' }, 'publishedAt'],
    ['oversized item', { ...goodBaseline, item: long }, 'item'],
    ['too many weeks', { ...goodBaseline, weeks: Array.from({ length: 200 }, (_, i) => ({ weekStart: `2026-01-${String((i % 28) + 1).padStart(2, '0')}`, quantity: 1 })) }, 'weeks'],
  ];
  it.each(cases)('%s', (_d, record, path) => {
    expectRejected('baseline-version', record, path);
  });
});

describe('a day-closed record is rejected with the field path and reason', () => {
  const cases: Case[] = [
    ['missing date', without(goodDayClosed, 'date'), 'date'],
    ['missing location', without(goodDayClosed, 'location'), 'location'],
    ['missing eventId', without(goodDayClosed, 'eventId'), 'eventId'],
    ['date as number', { ...goodDayClosed, date: 20260305 }, 'date'],
    ['date with time', { ...goodDayClosed, date: '2026-03-05T00:00:00Z' }, 'date'],
    ['impossible date', { ...goodDayClosed, date: '2026-02-29' }, 'date'],
    ['absurd year', { ...goodDayClosed, date: '3026-03-05' }, 'date'],
    ['oversized location', { ...goodDayClosed, location: long }, 'location'],
    ['location with spaces', { ...goodDayClosed, location: 'DC NORTH' }, 'location'],
    ['eventId with pipe', { ...goodDayClosed, eventId: 'a|b' }, 'eventId'],
    ['NaN as date', { ...goodDayClosed, date: Number.NaN }, 'date'],
  ];
  it.each(cases)('%s', (_d, record, path) => {
    expectRejected('day-closed', record, path);
  });
});

describe('a location master record is rejected with the field path and reason', () => {
  const cases: Case[] = [
    ['unknown time zone', { ...goodLocation, timeZone: 'Europe/Atlantis' }, 'timeZone'],
    ['offset instead of zone', { ...goodLocation, timeZone: '+01:00x' }, 'timeZone'],
    ['missing time zone', without(goodLocation, 'timeZone'), 'timeZone'],
    ['unknown week start', { ...goodLocation, weekStart: 'funday' }, 'weekStart'],
    ['every weekday closed', { ...goodLocation, closedWeekdays: ['monday', 'tuesday', 'wednesday', 'thursday', 'friday', 'saturday', 'sunday'] }, 'closedWeekdays'],
    ['holiday with impossible date', { ...goodLocation, holidays: [{ date: '2026-04-31', kind: 'closed' }] }, 'holidays.0.date'],
    ['holiday of unknown kind', { ...goodLocation, holidays: [{ date: '2026-04-03', kind: 'half' }] }, 'holidays.0.kind'],
    ['business hours reversed', { ...goodLocation, businessHours: { open: '22:00', close: '06:00' } }, 'businessHours.close'],
    ['impossible clock time', { ...goodLocation, dayCloseDeadline: '24:30' }, 'dayCloseDeadline'],
    ['negative unit price', { ...goodLocation, items: { 'COLA-1L': { unitPrice: -1 } } }, 'items.COLA-1L.unitPrice'],
    ['NaN case pack', { ...goodLocation, items: { 'COLA-1L': { casePack: Number.NaN } } }, 'items.COLA-1L.casePack'],
    ['oversized location id', { ...goodLocation, location: long }, 'location'],
  ];
  it.each(cases)('%s', (_d, record, path) => {
    expectRejected('location', record, path);
  });
});

describe('raw input', () => {
  it('malformed JSON is rejected without echoing the content', () => {
    const result = validator.parse('order-line', '{"eventId": "ev-1", "secretish": "hunter2",');
    expect(result.ok).toBe(false);
    if (!result.ok) {
      expect(result.code).toBe('NEARCAST_INPUT_MALFORMED_JSON');
      expect(describeIssues(result.issues)).not.toContain('hunter2');
    }
  });

  it('records nested deeper than the bound are rejected as too deep', () => {
    let deep: unknown = 1;
    for (let i = 0; i < 50; i += 1) deep = { d: deep };
    const result = validator.check('shipment', { ...{ eventId: 'e' }, extra: deep });
    expect(result.ok ? 'ok' : result.code).toBe('NEARCAST_INPUT_TOO_DEEP');
  });

  it('a JSON array is not a record', () => {
    const result = validator.parse('day-closed', '[1,2]');
    expect(result.ok ? '' : describeIssues(result.issues)).toBe('must be a JSON object');
  });

  it('messages name the field and say what is wrong in plain words', () => {
    const result = validator.check('order-line', { ...goodOrderLine, quantity: -3 });
    expect(result.ok ? '' : describeIssues(result.issues)).toBe('quantity: must not be negative');
  });

  it('the quantity ceiling is a setting', () => {
    const strict = new RecordValidator({ ...DEFAULT_INPUT_LIMITS, maxQuantity: 100 });
    const result = strict.check('shipment', goodShipment);
    expect(result.ok ? '' : describeIssues(result.issues)).toBe('quantity: must not exceed the configured ceiling of 100');
  });
});
