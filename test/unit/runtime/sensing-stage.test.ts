import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { manifestSchema } from '../../../src/contracts/manifest.ts';
import { planSchema, type Plan } from '../../../src/contracts/plan.ts';
import type { Manifest } from '../../../src/contracts/manifest.ts';
import type { DeadLetterRecord } from '../../../src/runtime/dead-letter.ts';
import type { EventLogRecord } from '../../../src/runtime/event-log-record.ts';
import { createSensingStage } from '../../../src/runtime/sensing-stage.ts';
import type { ChangelogEntry, OutputRecord } from '../../../src/runtime/stage-output.ts';
import { orderBookModels } from './fixtures/order-book-model.ts';
import { baseline, DC, entries, locationRecord, logRecord, order } from './fixtures/records.ts';

const stage = () => createSensingStage({ partition: 0, models: orderBookModels });
const plansOf = (outputs: readonly OutputRecord[]) => outputs.filter((o) => o.topic === 'plans' && !o.key.endsWith('#manifest')).map((o) => o.event.data as Plan);
const manifestsOf = (outputs: readonly OutputRecord[]) => outputs.filter((o) => o.key.endsWith('|#manifest')).map((o) => o.event.data as Manifest);
const run = (records: EventLogRecord[]) => {
  const s = stage();
  const result = s.apply(entries(records));
  s.commit();
  return result;
};

// 2026-03-02 is a Monday; Europe/Berlin is UTC+1 in early March (CET), so local midnight ending 03-02 is 23:00Z.
const base = [
  locationRecord(),
  baseline('COLA-1L', 1, '2026-02-27T12:00:00+01:00', [['2026-03-02', 100], ['2026-03-09', 110]]),
  order('COLA-1L', 30, '2026-03-02T10:00:00+01:00', '2026-03-04'),
];

describe('day close by watermark', () => {
  it('closes a day once an order timestamp passes local midnight plus the 30-minute grace', () => {
    const result = run([...base, order('COLA-1L', 5, '2026-03-03T00:31:00+01:00', '2026-03-05')]);
    expect(result.closes).toEqual([{ location: 'DC-NORTH', planDate: '2026-03-02', revision: 1, series: 1 }]);
    const [plan] = plansOf(result.outputs);
    expect(planSchema.safeParse(plan).success).toBe(true);
    // The close saw the 30 units booked before it, not the 5 booked after midnight (by hand: max(100, 30) = 100 for
    // lead 0 and the order book of that week is 30).
    expect(plan!.leads[0]!.explanation.orderBook).toBe(30);
  });

  it('does not close before the grace has passed', () => {
    const result = run([...base, order('COLA-1L', 5, '2026-03-03T00:29:00+01:00', '2026-03-05')]);
    expect(result.closes).toEqual([]);
  });

  it('is not advanced by requested dates, however far ahead', () => {
    const result = run([...base, order('COLA-1L', 5, '2026-03-02T11:00:00+01:00', '2026-04-30')]);
    expect(result.closes).toEqual([]);
  });

  it('never runs ahead of a record arrival plus the 5-minute skew', () => {
    // Stamped two days ahead by a wrong source clock, but it arrived on 03-02 at 12:00: the watermark stops at 12:05.
    const skewed = order('COLA-1L', 5, '2026-03-04T12:00:00+01:00', '2026-03-06', { arrival: '2026-03-02T12:00:00+01:00' });
    expect(run([...base, skewed]).closes).toEqual([]);
  });

  it('closes every day the watermark passed, in date order, skipping days that are not business days', () => {
    // Friday 03-06 order, then Tuesday 03-10: Fri, Mon close; Sat and Sun are closed weekdays (no plans).
    const records = [locationRecord(), order('COLA-1L', 1, '2026-03-06T09:00:00+01:00', '2026-03-06'), order('COLA-1L', 1, '2026-03-10T09:00:00+01:00', '2026-03-10')];
    expect(run(records).closes.map((c) => c.planDate)).toEqual(['2026-03-06', '2026-03-09']);
  });
});

describe('day close by record', () => {
  it('closes on a day-closed record, including earlier open days, in order', () => {
    const records = [
      locationRecord(),
      order('COLA-1L', 1, '2026-03-02T09:00:00+01:00', '2026-03-02'),
      logRecord('day-closed', { eventId: 'dc-1', location: 'DC-NORTH', date: '2026-03-03' }, '2026-03-03T20:00:00+01:00'),
    ];
    const result = run(records);
    expect(result.closes.map((c) => c.planDate)).toEqual(['2026-03-02', '2026-03-03']);
  });

  it('closes on a deadline-close record written by the clock, and ignores one for a day already closed', () => {
    const deadline = (date: string, at: string) => logRecord('deadline-close', { location: 'DC-NORTH', date, deadlineMs: Date.parse(at) }, at);
    const records = [...base, deadline('2026-03-02', '2026-03-03T04:00:00+01:00'), deadline('2026-03-02', '2026-03-03T04:00:00+01:00')];
    expect(run(records).closes.map((c) => c.planDate)).toEqual(['2026-03-02']);
  });
});

describe('publication', () => {
  it('publishes one plan per series in key order, then a manifest whose checksum is SHA-256 over the plan lines', () => {
    const records = [
      ...base,
      order('SPARK-LEMON-330', 12, '2026-03-02T11:00:00+01:00', '2026-03-03'),
      order('APPLE-JUICE-1L', 4, '2026-03-02T12:00:00+01:00', '2026-03-03'),
      order('COLA-1L', 1, '2026-03-03T08:00:00+01:00', '2026-03-03'),
    ];
    const { outputs } = run(records);
    expect(outputs.map((o) => o.key)).toEqual(['DC-NORTH|APPLE-JUICE-1L', 'DC-NORTH|COLA-1L', 'DC-NORTH|SPARK-LEMON-330', 'DC-NORTH|#manifest']);
    const plans = plansOf(outputs);
    const [manifest] = manifestsOf(outputs);
    expect(manifestSchema.safeParse(manifest).success).toBe(true);
    expect(manifest!.seriesCount).toBe(3);
    // Independent check with node:crypto over the texts as they would travel (one JSON line each).
    const expected = createHash('sha256').update(plans.map((p) => `${JSON.stringify(p)}\n`).join('')).digest('hex');
    expect(manifest!.checksum).toBe(expected);
  });

  it('gives each output a deterministic CloudEvents id and the close instant as its time', () => {
    const records = [...base, order('COLA-1L', 5, '2026-03-03T08:00:00+01:00', '2026-03-05')];
    const a = run(records).outputs;
    const b = run(records).outputs;
    expect(a.map((o) => o.event.id)).toEqual(b.map((o) => o.event.id));
    expect(new Set(a.map((o) => o.event.id)).size).toBe(a.length);
    // Close instant: local midnight ending 03-02 (23:00Z) plus 30 minutes.
    expect(a[0]!.event.time).toBe('2026-03-02T23:30:00.000Z');
  });
});

describe('quarantine', () => {
  it('dead-letters records of an unknown location with their source and goes on with the rest', () => {
    const stranger = logRecord('order-line', {
      eventId: 'x1', orderId: 'o', lineId: '1', revision: 1, op: 'upsert', location: 'DC-NOWHERE', item: 'COLA-1L', quantity: 3,
      orderedAt: '2026-03-02T10:00:00+01:00', requestedDate: '2026-03-03',
    });
    const result = run([...base, stranger, order('COLA-1L', 5, '2026-03-03T08:00:00+01:00', '2026-03-05')]);
    const dead = result.outputs.filter((o) => o.topic === 'deadLetter').map((o) => o.event.data as DeadLetterRecord);
    expect(dead).toHaveLength(1);
    expect(dead[0]).toMatchObject({ code: 'NEARCAST_INPUT_UNKNOWN_LOCATION', stage: 'sensing', location: 'DC-NOWHERE', source: stranger.source });
    expect(JSON.parse(dead[0]!.raw)).toMatchObject({ eventId: 'x1' });
    expect(result.closes).toHaveLength(1);
  });

  it('dead-letters a record the model rejects, with the model reason and field path', () => {
    const misaligned = baseline('COLA-1L', 2, '2026-03-02T12:00:00+01:00', [['2026-03-04', 100]]);
    const dead = run([...base, misaligned]).outputs.filter((o) => o.topic === 'deadLetter').map((o) => o.event.data as DeadLetterRecord);
    expect(dead[0]).toMatchObject({ code: 'NEARCAST_INPUT_WEEK_MISALIGNED', issues: [{ path: 'weeks' }] });
  });
});

describe('exactly-once effect', () => {
  const all = [
    ...base,
    order('COLA-1L', 5, '2026-03-03T08:00:00+01:00', '2026-03-05'),
    order('COLA-1L', 7, '2026-03-04T08:00:00+01:00', '2026-03-05'),
    order('COLA-1L', 9, '2026-03-05T08:00:00+01:00', '2026-03-06'),
  ];
  const uninterrupted = run(all).outputs.map((o) => JSON.stringify(o));

  it('skips entries below the applied offset, so a re-delivered batch changes nothing', () => {
    const s = stage();
    const first = s.apply(entries(all));
    s.commit();
    const again = s.apply(entries(all));
    s.commit();
    expect(first.outputs.length).toBeGreaterThan(0);
    expect(again.outputs).toEqual([]);
    expect(again.nextOffset).toBe(String(all.length));
  });

  it('drops its state on abort, refuses to go on until restored, and then gives the uninterrupted outputs', () => {
    const s = stage();
    const out: string[] = [];
    const a = s.apply(entries(all.slice(0, 4)));
    s.commit();
    out.push(...a.outputs.map((o) => JSON.stringify(o)));
    s.apply(entries(all.slice(4), 4));
    s.abort();
    expect(s.locations()).toEqual([]);
    expect(() => s.apply(entries(all.slice(4), 4))).toThrow(/restore it first/);
    s.restore(a.changelog);
    expect(s.nextOffset()).toBe('4');
    const b = s.apply(entries(all.slice(4), 4));
    s.commit();
    out.push(...b.outputs.map((o) => JSON.stringify(o)));
    expect(out).toEqual(uninterrupted);
  });

  it('restores from its changelog and carries on as if never stopped', () => {
    const s1 = stage();
    const changelog: ChangelogEntry[] = [];
    const out: string[] = [];
    const a = s1.apply(entries(all.slice(0, 4)));
    s1.commit();
    changelog.push(...a.changelog);
    out.push(...a.outputs.map((o) => JSON.stringify(o)));
    const s2 = stage();
    s2.restore(changelog);
    expect(s2.nextOffset()).toBe('4');
    expect(s2.locations()).toEqual([DC.location]);
    // The transport re-reads from its last committed offset; entries 0..3 are skipped by the restored offset.
    const b = s2.apply(entries(all));
    s2.commit();
    out.push(...b.outputs.map((o) => JSON.stringify(o)));
    expect(out).toEqual(uninterrupted);
  });
});

describe('late data', () => {
  const closedMonday = [...base, order('COLA-1L', 1, '2026-03-03T08:00:00+01:00', '2026-03-03')];
  // An order placed on Monday that arrives Tuesday 09:00, after Monday was closed.
  const lateBig = order('COLA-1L', 200, '2026-03-02T15:00:00+01:00', '2026-03-04', { arrival: '2026-03-03T09:00:00+01:00' });

  it('republishes the last plan date with the next revision once the 15-minute debounce has passed', () => {
    const after = order('COLA-1L', 1, '2026-03-03T09:20:00+01:00', '2026-03-03');
    const result = run([...closedMonday, lateBig, after]);
    expect(result.closes.map((c) => `${c.planDate}#${c.revision}`)).toEqual(['2026-03-02#1', '2026-03-02#2']);
    const restated = plansOf(result.outputs).filter((p) => p.revision === 2);
    // By hand: the week of 03-02 holds 30 (Monday) + 1 (Tuesday 08:00) + the late 200 = 231 (> the baseline of 100).
    expect(restated[0]!.leads[0]!.adjusted).toBe(231);
    expect(manifestsOf(result.outputs).map((m) => m.revision)).toEqual([1, 2]);
  });

  it('waits for the debounce: a record 10 minutes later does not restate yet', () => {
    const soon = order('COLA-1L', 1, '2026-03-03T09:10:00+01:00', '2026-03-03');
    expect(run([...closedMonday, lateBig, soon]).closes).toHaveLength(1);
  });

  it('does not restate a change below the 1 % threshold; the next close reflects it', () => {
    // 100 → 100: a late order of 2 units stays under the baseline of 100, so the adjusted plan does not move.
    const lateSmall = order('COLA-1L', 2, '2026-03-02T15:00:00+01:00', '2026-03-04', { arrival: '2026-03-03T09:00:00+01:00' });
    const after = order('COLA-1L', 1, '2026-03-03T09:20:00+01:00', '2026-03-03');
    const tuesdayClose = order('COLA-1L', 1, '2026-03-04T08:00:00+01:00', '2026-03-04');
    const result = run([...closedMonday, lateSmall, after, tuesdayClose]);
    expect(result.closes.map((c) => `${c.planDate}#${c.revision}`)).toEqual(['2026-03-02#1', '2026-03-03#1']);
    const tuesday = plansOf(result.outputs).find((p) => p.planDate === '2026-03-03')!;
    // 30 + 1 + the late 2 + 1 (09:20); the 08:00 Wednesday order that closed Tuesday is not part of Tuesday.
    expect(tuesday.leads[0]!.explanation.orderBook).toBe(30 + 1 + 2 + 1);
  });
});

describe('feed health', () => {
  it('tells monitoring at close that a check found the feed silent during business hours that day', () => {
    const check = (at: string) => logRecord('feed-health-check', { location: 'DC-NORTH', atMs: Date.parse(at) }, at);
    // Last order Monday 10:00; checks Tuesday 11:00 (25 h silent > 3 h) and the Tuesday close.
    const records = [...base, check('2026-03-03T11:00:00+01:00'), order('COLA-1L', 1, '2026-03-04T08:00:00+01:00', '2026-03-04')];
    const alerts = run(records).outputs.filter((o) => o.topic === 'alerts');
    expect(alerts.map((a) => a.key)).toEqual(['DC-NORTH|*|feed-stalled|2026-03-03']);
  });
});
