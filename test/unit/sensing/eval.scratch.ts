import { generateScenario, dayOf } from './helpers/scenario.ts';
import { stateOf, planAt, leadOf } from './helpers/run.ts';
import { actualWeekly } from './helpers/actuals.ts';
import { sensingSettings } from '../../../src/sensing/settings.ts';
const S = sensingSettings(JSON.parse(process.argv[3] ?? '{}'));
const which = process.argv[2];
if (which === '20') {
  const sc = generateScenario({ seed: 3, weeks: 20, series: Array.from({length: 8}, (_, i) => ({ item: `IT-${i}`, perDay: 50 + 20 * i, noise: 0.02, earlyShare: 0.3, level: () => 1.2 })) });
  const st = stateOf(sc);
  for (const wd of [0, 2, 4]) { const r = planAt(st, dayOf(sc, 18, wd)); console.log(wd, r.plans.map(p => (p.leads[1]!.adjusted / p.leads[1]!.baseline!).toFixed(3)).join(' ')); }
}
if (which === '35') {
  for (const scope of ['all', 'some']) {
  const sc = generateScenario({ seed: 5, weeks: 22, series: Array.from({length: 8}, (_, i) => ({ item: `IT-${i}`, perDay: 50 + 30 * i, noise: 0.02, earlyShare: 0.3, lineSize: (50 + 30 * i) / 10, level: (w: number) => (w >= 16 && (scope === 'all' || i < 3) ? 1.35 : 1) })) });
  const st = stateOf(sc);
  for (const wd of [0, 2, 4]) { const r = planAt(st, dayOf(sc, 18, wd)); console.log(scope, wd, r.plans.map(p => (p.leads[1]!.adjusted / p.leads[1]!.baseline!).toFixed(3)).join(' ')); }
  }
}
if (which === 'wape' || which === 'cal') {
  const levels = which === 'cal' ? [2, 10, 50, 400] : [5, 20, 50, 200];
  const sc = generateScenario({ seed: Number(process.env.SEED ?? 11), weeks: 40, series: Array.from({length: 16}, (_, i) => ({ item: `IT-${i}`, perDay: levels[i % 4]!, noise: 0.03, earlyShare: 0.25, wobble: 0.03, reviseShare: 0.05 })) });
  const st = stateOf(sc, S);
  const act = actualWeekly(sc);
  const agg: Record<string, { ea: number; eb: number; sa: number; cov: number; n: number }> = {};
  for (let w = 20; w < 38; w++) for (const wd of [0, 2, 4]) {
    const r = planAt(st, dayOf(sc, w, wd), S);
    for (const p of r.plans) for (const l of p.leads) {
      const a = act.get(p.item)?.get(l.weekStart); if (a === undefined || l.baseline === null) continue;
      const band = l.explanation.volumeBand;
      const k = `${band} L${l.lead}`; const g = (agg[k] ??= { ea: 0, eb: 0, sa: 0, cov: 0, n: 0 });
      g.ea += Math.abs(l.adjusted - a); g.eb += Math.abs(l.baseline - a); (g as any).qa = ((g as any).qa ?? 0) + (l.adjusted - a) ** 2 / (l.baseline + 1); (g as any).qb = ((g as any).qb ?? 0) + (l.baseline - a) ** 2 / (l.baseline + 1); g.sa += a; g.n++;
      const lo = l.quantiles.p10!, hi = l.quantiles.p90!;
      g.cov += a > lo && a < hi ? 1 : (a === lo || a === hi) ? 0.5 : 0;
    }
  }
  const tot: Record<string, {ea:number,eb:number,qa:number,qb:number}> = {};
  for (const [k, g] of Object.entries(agg)) { const L = k.split(' ')[1]!; (tot[L] ??= {ea:0,eb:0,qa:0,qb:0}); tot[L].ea += g.ea; tot[L].eb += g.eb; tot[L].qa += (g as any).qa; tot[L].qb += (g as any).qb; }
  console.log(Object.entries(tot).map(([L,g]) => L + ' ' + (g.ea/g.eb).toFixed(3) + ' mse ' + (g.qa/g.qb).toFixed(3)).join('  '));
  if (process.env.V) for (const [k, g] of Object.entries(agg).sort()) console.log(k, 'wapeRatio', (g.ea / g.eb).toFixed(3), 'wapeB', (g.eb / g.sa).toFixed(3), 'cov', (g.cov / g.n).toFixed(3), g.n);
}
