import { describe, expect, it } from 'vitest';
import { dayNumber } from '../../../src/calendar/day-number.ts';
import { createLocationCalendar } from '../../../src/calendar/location-calendar.ts';
import { dailySplit } from '../../../src/sensing/daily-split.ts';
import { applyGuardrails, guardrailBounds } from '../../../src/sensing/guardrails.ts';
import { recomputeContext } from '../../../src/sensing/recompute-context.ts';
import { DEFAULT_SENSING_SETTINGS as S } from '../../../src/sensing/settings.ts';
import { MASTER } from './helpers/records.ts';

describe('guardrails', () => {
  it('bound a ratio around the baseline and widen by the absolute slack near zero', () => {
    // Defaults: ratio 0.5 … 2, slack 5 units a week.
    expect(guardrailBounds(100, S)).toEqual({ lower: 50, upper: 200, lowerKind: 'ratio-lower', upperKind: 'ratio-upper' });
    expect(guardrailBounds(2, S)).toEqual({ lower: 0, upper: 7, lowerKind: 'absolute-lower', upperKind: 'absolute-upper' });
  });

  it('let the surviving order book win over the upper bound', () => {
    const b = guardrailBounds(100, S);
    expect(applyGuardrails(260, b, 0)).toEqual({ value: 200, guardrail: 'ratio-upper' });
    expect(applyGuardrails(260, b, 230)).toEqual({ value: 230, guardrail: 'order-book-floor' });
    expect(applyGuardrails(30, b, 0)).toEqual({ value: 50, guardrail: 'ratio-lower' });
    expect(applyGuardrails(120, b, 10)).toEqual({ value: 120, guardrail: null });
  });
});

describe('the daily split', () => {
  const cal = createLocationCalendar({ ...MASTER, holidays: [{ date: '2026-03-13', kind: 'closed' }] });
  const ctx = recomputeContext(cal, { planDate: '2026-03-10', knownAt: '2026-03-10T22:00:00Z' }, S);
  const flat = Float64Array.from([0, 0.2, 0.2, 0.2, 0.2, 0.2, 0, 0]);

  it('keeps actuals to date and spreads the unbooked rest over the open days by profile', () => {
    // Week of Monday 9 March: actual 30 on Monday and 20 on Tuesday (plan date), 10 booked for Wednesday, Friday
    // a closed holiday. Adjusted 110: remaining 60, of which 10 booked → 50 over Wed/Thu (weights 0.2 each).
    const daily = new Float64Array(ctx.nDays);
    const d0 = dayNumber('2026-03-09') - ctx.firstDay;
    daily[d0] = 30;
    daily[d0 + 1] = 20;
    daily[d0 + 2] = 10;
    const split = dailySplit(110, dayNumber('2026-03-09'), daily, flat, ctx);
    expect(split.map((d) => d.quantity)).toEqual([30, 20, 35, 25, 0, 0, 0]);
  });

  it('scales booked days down when the plan is below what is booked', () => {
    const daily = new Float64Array(ctx.nDays);
    const d0 = dayNumber('2026-03-16') - ctx.firstDay;
    daily[d0] = 40;
    daily[d0 + 1] = 40;
    const split = dailySplit(60, dayNumber('2026-03-16'), daily, flat, ctx);
    expect(split.map((d) => d.quantity)).toEqual([30, 30, 0, 0, 0, 0, 0]);
  });
});
