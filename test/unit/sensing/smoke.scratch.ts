import { generateScenario, dayOf } from './helpers/scenario.ts';
import { stateOf, planAt, leadOf } from './helpers/run.ts';
const sc = generateScenario({ seed: 1, weeks: 24, series: Array.from({length: 8}, (_, i) => ({ item: `ITEM-${i}`, perDay: 50, noise: 0.02, earlyShare: 0.3, level: (w: number) => (w >= 18 ? 1.2 : 1) })) });
let t = performance.now();
const st = stateOf(sc);
console.log('records', sc.records.length, 'apply ms', (performance.now() - t).toFixed(0));
t = performance.now();
const r = planAt(st, dayOf(sc, 20, 0));
console.log('sense ms', (performance.now() - t).toFixed(0));
console.log(JSON.stringify(r.model.map(m => [m.lead, m.rows, m.coefficients.map(c=>c.value.toFixed(3)).join(' '), m.locationFactor.toFixed(3), m.survivalRate.toFixed(3), m.weightedR2?.toFixed(3)])));
for (let L = 0; L <= 4; L++) { const l = leadOf(r, 'ITEM-0', L); console.log(L, l.baseline?.toFixed(1), l.adjusted.toFixed(1), JSON.stringify(l.quantiles), l.explanation.fallback, l.explanation.guardrail, l.explanation.terms.map(t=>t.contribution.toFixed(3)).join(' ')); }
