import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Plan } from '../../../src/contracts/plan.ts';
import { createLocationState } from '../../../src/sensing/location-state.ts';
import { snapshotLocationState } from '../../../src/sensing/snapshot.ts';
import { dayOf, generateScenario, type Scenario, type ScenarioRecord, type SeriesSpec } from './helpers/scenario.ts';
import { applyRecord, planAt, stateOf } from './helpers/run.ts';

function scaled(sc: Scenario, c: number): Scenario {
  const records = sc.records.map((r): ScenarioRecord => {
    if (r.kind === 'order-line') return { ...r, record: { ...r.record, quantity: r.record.quantity === undefined ? undefined : r.record.quantity * c } };
    if (r.kind === 'shipment') return { ...r, record: { ...r.record, quantity: r.record.quantity * c } };
    return { ...r, record: { ...r.record, weeks: r.record.weeks.map((w) => ({ ...w, quantity: w.quantity * c })) } };
  });
  return { ...sc, records };
}

const close = (a: number, b: number) => Math.abs(a - b) <= 1e-7 * Math.max(1, Math.abs(a), Math.abs(b));

describe('properties of the sensing engine', () => {
  // Two rules depend on volume by design and are kept out of this property's range: series below
  // smallSeriesPerDay take the small-series path, and while no series of the location has a noise estimate of its
  // own yet (its first weeks), rows are weighed by the count noise of a Poisson week, 1/level + φ (DESIGN: "inverse
  // variance … from its volume and dispersion"). So: 12–30 units a day, one volume band (10–50) for c up to 1.6,
  // 26 weeks of history so that even the oldest as-of day of the lookback has its own estimates. Quantiles and
  // dispersion are count-based and are not expected to scale.
  it('scales every adjusted number by c when every quantity is scaled by c (no volume rule changes regime)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 10_000 }), fc.double({ min: 1, max: 1.6, noNaN: true }), fc.double({ min: 0.8, max: 1.3, noNaN: true }), (seed, c, shift) => {
        const series: SeriesSpec[] = Array.from({ length: 6 }, (_, i) => ({
          item: `TONIC-${i}`,
          perDay: 12 + 3 * i,
          noise: 0.05,
          earlyShare: 0.1 * (i % 4),
          reviseShare: 0.1,
          level: (w: number) => (w >= 22 && i % 2 === 0 ? shift : 1),
        }));
        const sc = generateScenario({ seed, weeks: 26, series });
        const date = dayOf(sc, 24, seed % 5);
        const a = planAt(stateOf(sc), date);
        const b = planAt(stateOf(scaled(sc, c)), date);
        a.plans.forEach((pa, i) => {
          const pb = b.plans[i]!;
          pa.leads.forEach((la, L) => {
            const lb = pb.leads[L]!;
            expect(close(lb.adjusted, c * la.adjusted)).toBe(true);
            expect(close(lb.baseline!, c * la.baseline!)).toBe(true);
            expect(close(lb.explanation.survivingOrderBook, c * la.explanation.survivingOrderBook)).toBe(true);
            expect(close(lb.explanation.predictedRatio, la.explanation.predictedRatio)).toBe(true);
            (la.daily ?? []).forEach((d, k) => expect(close(lb.daily![k]!.quantity, c * d.quantity)).toBe(true));
          });
        });
      }),
      { numRuns: 12, seed: 20_261_202 },
    );
  });

  it('never plans below the surviving order book, keeps within the guardrails otherwise, and keeps quantiles monotone', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 10_000 }),
        fc.double({ min: 0.3, max: 3, noNaN: true }),
        fc.double({ min: 0, max: 0.8, noNaN: true }),
        fc.integer({ min: 0, max: 4 }),
        (seed, shift, early, weekday) => {
          const series: SeriesSpec[] = Array.from({ length: 6 }, (_, i) => ({
            item: `LEMONADE-${i}`,
            perDay: [0.5, 3, 20, 90][i % 4]!,
            noise: 0.1,
            earlyShare: early,
            reviseShare: 0.2,
            level: (w: number) => (w >= 14 && i % 3 !== 0 ? shift : 1),
            extraLines: i === 2 ? [[17, 2, 900, 'FESTIVAL']] : [],
          }));
          const sc = generateScenario({ seed, weeks: 19, series });
          const result = planAt(stateOf(sc), dayOf(sc, 16, weekday));
          for (const plan of result.plans) checkPlan(plan);
        },
      ),
      { numRuns: 8, seed: 20_261_203 },
    );
  });

  it('reaches the identical state and plans whatever the order the records arrive in', () => {
    const series: SeriesSpec[] = [1, 8, 30].map((perDay, i) => ({ item: `KOMBUCHA-${i}`, perDay, noise: 0.1, earlyShare: 0.3, reviseShare: 0.4 }));
    const sc = generateScenario({ seed: 77, weeks: 7, series });
    const canonical = stateOf(sc);
    const want = JSON.stringify(snapshotLocationState(canonical));
    const wantPlans = JSON.stringify(planAt(canonical, dayOf(sc, 6, 1)));
    fc.assert(
      fc.property(fc.shuffledSubarray(sc.records, { minLength: sc.records.length, maxLength: sc.records.length }), (order) => {
        const state = createLocationState(sc.master);
        for (const r of order) expect(applyRecord(state, r).status).not.toBe('rejected');
        expect(JSON.stringify(snapshotLocationState(state))).toBe(want);
        expect(JSON.stringify(planAt(state, dayOf(sc, 6, 1)))).toBe(wantPlans);
      }),
      { numRuns: 10, seed: 20_261_204 },
    );
  });
});

function checkPlan(plan: Plan): void {
  let prevCum: Record<string, number> | undefined;
  for (const l of plan.leads) {
    const e = l.explanation;
    const eps = 1e-9 * Math.max(1, l.adjusted);
    expect(l.adjusted).toBeGreaterThanOrEqual(e.survivingOrderBook - eps);
    if (e.bounds) {
      expect(l.adjusted).toBeGreaterThanOrEqual(e.bounds.lower - eps);
      expect(l.adjusted).toBeLessThanOrEqual(Math.max(e.bounds.upper, e.survivingOrderBook) + eps);
    }
    const q = l.quantiles;
    expect(q.p10!).toBeLessThanOrEqual(q.p50!);
    expect(q.p50!).toBeLessThanOrEqual(q.p90!);
    expect(q.p50!).toBeGreaterThanOrEqual(e.survivingOrderBook - eps);
    const cq = l.cumulativeQuantiles;
    expect(cq.p10!).toBeLessThanOrEqual(cq.p90!);
    if (prevCum) for (const k of Object.keys(cq)) expect(cq[k]!).toBeGreaterThanOrEqual(prevCum[k]! - eps);
    prevCum = cq;
    if (l.daily) expect(l.daily.reduce((s, d) => s + d.quantity, 0)).toBeCloseTo(Math.max(l.adjusted, l.actualToDate), 6);
  }
}
