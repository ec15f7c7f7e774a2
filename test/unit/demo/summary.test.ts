import { describe, expect, it } from 'vitest';
import type { PlanLead } from '../../../src/contracts/plan.ts';
import { reasonOf } from '../../../src/demo/summary.ts';

const lead = (e: Partial<PlanLead['explanation']>) =>
  ({ explanation: { fallback: null, guardrail: null, coverage: null, recentRatio: null, locationFactor: 1, seriesFactor: 1, seriesEvidenceWeight: 0, terms: [], notes: [], orderBook: 0, survivingOrderBook: 0, ...e } }) as unknown as PlanLead;

describe('the reason for a move', () => {
  it('says the order book holds the number up when the floor acted', () => {
    expect(reasonOf(lead({ guardrail: 'order-book-floor', orderBook: 1200, survivingOrderBook: 1140 }))).toBe('held up by the order book (1,140 expected to survive of 1,200 booked)');
  });

  it('names coverage, recent ratio and the location-wide factor when they moved', () => {
    expect(reasonOf(lead({ coverage: 1.4, recentRatio: 1.2, locationFactor: 1.16 }))).toBe(
      'order book at 1.40× its usual level for this point; recent weeks ran at 1.20× the baseline; location-wide factor 1.16',
    );
  });

  it('says a quiet series stays near its baseline', () => {
    expect(reasonOf(lead({}))).toBe('within the noise of the series: stays near its baseline');
  });
});
