import { describe, expect, it } from 'vitest';
import { monitoringSettings } from '../../../src/monitoring/settings.ts';
import { businessDates, dayInput, quiet, runDays } from './helpers.ts';

const DATES = businessDates('2026-03-02', 30);

// Intake at 40 a day against a baseline of 40, stepping to `after` from day `from` on (no noise: the step is the story).
function step(after: number, from: number, n: number, plan: (i: number) => number = () => 40) {
  return DATES.slice(0, n).map((d, i) => dayInput(d, [...quiet(8), { item: 'TONIC-200', intake: i >= from ? after : 40, expected: plan(i), baseline: 40 }]));
}

describe('the shift rule', () => {
  it('turns a sustained step into one episode: one alert, re-centred on the new level, naming both rules that fired', () => {
    // Against a plan that follows demand from the second day, the CUSUM on the baseline sees the whole step.
    const { alerts, state } = runDays(step(56, 5, 25, (i) => (i >= 6 ? 56 : 40)));
    const tonic = alerts.filter((a) => a.item === 'TONIC-200');
    expect(new Set(tonic.map((a) => a.alertId)).size).toBe(1);
    expect(tonic[0]!.change).toBe('opened');
    const last = tonic.at(-1)!;
    expect(last.firedRules).toContain('shift-up');
    expect(state.series['TONIC-200']!.level).toBeCloseTo(56 / 40, 1);
    // Settled at the new level and in line with the plan, the episode ends.
    expect(last.change).toBe('auto-resolved');
  });

  it('dates the episode from the start of the run that signalled', () => {
    const { alerts } = runDays(step(52, 5, 12, (i) => (i >= 5 ? 52 : 40)));
    const first = alerts.find((a) => a.item === 'TONIC-200')!;
    expect(first.rule).toBe('shift-up');
    expect(first.episodeStart).toBe(DATES[5]);
    expect(first.levelRatio).toBeCloseTo(1.3, 1);
  });

  it('opens a shift-down on a sustained fall, held back on a holiday', () => {
    const base = step(26, 5, 12, (i) => (i >= 5 ? 26 : 40));
    const { alerts } = runDays(base);
    expect(alerts.find((a) => a.item === 'TONIC-200')!.rule).toBe('shift-down');
    const holidays = base.map((d, i) => (i >= 5 ? { ...d, isHoliday: true } : d));
    expect(runDays(holidays).alerts.filter((a) => a.item === 'TONIC-200')).toEqual([]);
  });

  it('restarts on a re-plan: a new baseline version at the new level is not a shift', () => {
    const days = step(56, 5, 15, (i) => (i >= 5 ? 56 : 40)).map((d, i) =>
      i >= 5 ? { ...d, series: d.series.map((s) => ((s as { item: string }).item === 'TONIC-200' ? { ...(s as object), expectedFromBaseline: 56, baselineVersion: 2 } : s)) } : d,
    );
    expect(runDays(days).alerts.filter((a) => a.item === 'TONIC-200')).toEqual([]);
  });

  it('offers the EWMA as the shift statistic instead of the CUSUM', () => {
    const ewma = monitoringSettings({ shift: { statistic: 'ewma' } });
    const { alerts, state } = runDays(step(52, 5, 15, (i) => (i >= 5 ? 52 : 40)), ewma);
    const first = alerts.find((a) => a.item === 'TONIC-200')!;
    expect(first.rule).toBe('shift-up');
    expect(state.series['TONIC-200']!.level).toBeGreaterThan(1.15);
  });
});

describe('the plan-divergence rule', () => {
  const lead = (adjusted: number, lower: number, upper: number) => ({ lead: 1, weekStart: '2026-03-09', baseline: 200, adjusted, lower, upper });
  const days = (leads: ReturnType<typeof lead>[]) => leads.map((planLead, i) => dayInput(DATES[i]!, [...quiet(5), { item: 'COLA-1L', intake: 40, expected: 40, planLead }]));

  it('raises one alert while the adjusted plan is far from the baseline and the baseline outside the band', () => {
    const { alerts } = runDays(days([lead(280, 240, 320), lead(290, 250, 330), lead(285, 245, 325)]));
    expect(alerts).toHaveLength(1);
    expect(alerts[0]).toMatchObject({ rule: 'plan-divergence', levelRatio: 1.4, unitsAtRisk: 80, observed: 280, expected: 200 });
  });

  it('does not fire when the baseline lies inside the band, or when the gap is small', () => {
    expect(runDays(days([lead(280, 190, 330)])).alerts).toEqual([]);
    expect(runDays(days([lead(230, 215, 245)])).alerts).toEqual([]);
  });

  it('ends the episode only after the gap has closed for the in-control run (hysteresis)', () => {
    // 0.24 is below the 0.25 threshold but above 0.25 × 0.8: not in control, so the episode stays open.
    const seq = [lead(280, 240, 320), lead(248, 215, 290), ...Array.from({ length: 5 }, () => lead(205, 180, 230))];
    const { alerts } = runDays(days(seq));
    expect(alerts.map((a) => [a.change, a.changedOn])).toEqual([
      ['opened', DATES[0]],
      ['auto-resolved', DATES[6]],
    ]);
  });
});
