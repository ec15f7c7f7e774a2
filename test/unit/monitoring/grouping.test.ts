import { describe, expect, it } from 'vitest';
import { customerGroupItem } from '../../../src/monitoring/grouping.ts';
import { monitoringSettings } from '../../../src/monitoring/settings.ts';
import { businessDates, dayInput, quiet, runDays, type SeriesSpec } from './helpers.ts';

const DATES = businessDates('2026-03-02', 12);

function spikesOn(day: number, items: string[], extra: (item: string) => Partial<SeriesSpec> = () => ({})) {
  return DATES.slice(0, 10).map((d, i) =>
    dayInput(d, [
      ...quiet(10),
      ...items.map((item, k) => ({ item, intake: i === day + (k % 2) ? 150 : 40, expected: 40, ...extra(item) })),
    ]),
  );
}

describe('grouping', () => {
  const items = ['COLA-1L', 'COLA-ZERO-1L', 'SPARK-LEMON-330', 'SPARK-LIME-330', 'TONIC-200', 'GINGER-ALE-200'];

  it('turns many series of a location firing up within days into one paged location alert listing every member', () => {
    const { alerts } = runDays(spikesOn(1, items));
    const group = alerts.filter((a) => a.scope === 'location');
    const opened = group.find((a) => a.change === 'opened')!;
    expect(opened).toMatchObject({ rule: 'demand-up', item: '*', delivery: 'page' });
    const lastGroupRecord = group.filter((a) => a.change !== 'auto-resolved').at(-1)!;
    expect(lastGroupRecord.members.map((m) => m.item).sort()).toEqual([...items].sort());
    // Members opened on the day the group forms, or later, go to the digest and name the group; those paged the day
    // before keep their page. Four pages in all: three series on day 1, then the group.
    const series = alerts.filter((a) => a.scope === 'series' && a.change === 'opened');
    expect(series).toHaveLength(items.length);
    const joined = series.filter((a) => a.changedOn >= opened.changedOn);
    expect(joined).toHaveLength(3);
    for (const s of joined) expect(s).toMatchObject({ groupId: opened.alertId, delivery: 'digest' });
    const pages = alerts.filter((a) => a.delivery === 'page' && a.change === 'opened');
    expect(pages.map((p) => p.scope)).toEqual(['series', 'series', 'series', 'location']);
  });

  it('resolves the group once its last member has resolved', () => {
    const { alerts } = runDays(spikesOn(0, items));
    const group = alerts.filter((a) => a.scope === 'location');
    expect(group.at(-1)!.change).toBe('auto-resolved');
    const lastMember = Math.max(...alerts.filter((a) => a.scope === 'series' && a.state === 'resolved').map((a) => Date.parse(a.changedOn)));
    expect(Date.parse(group.at(-1)!.changedOn)).toBe(lastMember);
  });

  it('groups series whose deviation one customer carries into a customer alert', () => {
    const { alerts } = runDays(
      spikesOn(1, items.slice(0, 4), () => ({ byCustomer: [{ customer: 'HARBOUR-BAR', intake: 10 }, { customer: 'CITY-MART', intake: 30 }] })).map((input, i) => ({
        ...input,
        series: input.series.map((s) =>
          (s as { intake: number }).intake === 150 ? { ...(s as object), byCustomer: [{ customer: 'HARBOUR-BAR', intake: 120 }, { customer: 'CITY-MART', intake: 30 }] } : s,
        ),
        date: DATES[i]!,
      })),
    );
    const customer = alerts.filter((a) => a.scope === 'customer');
    expect(customer[0]).toMatchObject({ rule: 'demand-up', customer: 'HARBOUR-BAR', item: customerGroupItem('HARBOUR-BAR') });
    // What a distribution centre may read (id, item, message) never names the customer.
    for (const a of customer) expect(`${a.alertId} ${a.item} ${a.message} ${a.whatToCheck}`).not.toContain('HARBOUR-BAR');
    expect(customer.at(-1)!.memberCount).toBe(4);
    expect(alerts.some((a) => a.scope === 'location')).toBe(false);
  });

  it('does not group fewer series than the minimum', () => {
    const { alerts } = runDays(spikesOn(1, items.slice(0, 3)));
    expect(alerts.some((a) => a.scope !== 'series')).toBe(false);
  });

  it('keeps pages within the budget, the largest value at risk first, the rest in the digest', () => {
    const noGroups = monitoringSettings({ group: { minLocationMembers: 100 }, budget: { pagesPerLocationDay: 3 } });
    const spikes = Array.from({ length: 6 }, (_, k) => ({ item: `WATER-${k}`, intake: 150, expected: 40, unitPrice: k + 1 }));
    const { results } = runDays([dayInput(DATES[0]!, [...quiet(10), ...spikes])], noGroups);
    const r = results[0]!;
    const paged = r.alerts.filter((a) => a.delivery === 'page').map((a) => a.item);
    expect(paged.sort()).toEqual(['WATER-3', 'WATER-4', 'WATER-5']);
    expect(r.digest!.toDigest.map((t) => t.reason)).toEqual(['over-budget', 'over-budget', 'over-budget']);
    expect(r.digest!.pagesUsed).toBe(3);
  });
});

describe('grouping after a person resolved the group', () => {
  it('absorbs the same story’s new members, and lets a new story page again once the first has been quiet', async () => {
    const { applyCommand } = await import('../../../src/monitoring/intraday.ts');
    const dates = businessDates('2026-04-06', 24);
    const first = ['COLA-1L', 'COLA-ZERO-1L', 'TONIC-200', 'GINGER-ALE-200'];
    const second = ['WATER-500', 'ICED-TEA-500', 'SPARK-LEMON-330', 'SPARK-LIME-330'];
    const day = (i: number) =>
      dayInput(dates[i]!, [
        ...quiet(6),
        ...first.map((item) => ({ item, intake: i === 0 ? 150 : 40, expected: 40 })),
        { item: 'MALT-330', intake: i === 1 ? 150 : 40, expected: 40 },
        ...second.map((item) => ({ item, intake: i === 20 ? 150 : 40, expected: 40 })),
      ]);
    const start = runDays([day(0)]);
    const group = start.alerts.find((a) => a.scope === 'location')!;
    const state = applyCommand(start.state, { commandId: 'close-story', alertId: group.alertId, action: 'resolve', by: 'planner.anna', atMs: Date.parse(`${dates[0]}T18:00:00Z`) }).state;
    const later = runDays(Array.from({ length: 23 }, (_, k) => day(k + 1)), undefined, state).alerts;
    // The next day's MALT-330 spike belongs to the resolved story: no page of its own, no group record.
    const malt = later.find((a) => a.item === 'MALT-330')!;
    expect(malt).toMatchObject({ delivery: 'digest', groupId: group.alertId });
    // Weeks later a new story forms a new group that pages.
    const next = later.filter((a) => a.scope === 'location' && a.change === 'opened');
    expect(next).toHaveLength(1);
    expect(next[0]).toMatchObject({ changedOn: dates[20], delivery: 'page' });
    expect(next[0]!.alertId).not.toBe(group.alertId);
  });
});
