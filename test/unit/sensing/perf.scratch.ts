import { generateScenario, dayOf } from './helpers/scenario.ts';
import { stateOf, planAt } from './helpers/run.ts';
const n = Number(process.argv[2] ?? 200);
const sc = generateScenario({ seed: 1, weeks: 26, series: Array.from({length: n}, (_, i) => ({ item: `ITEM-${i}`, perDay: [0.5, 3, 20, 80][i % 4]!, noise: 0.05, earlyShare: 0.3 })) });
const st = stateOf(sc);
const { writeFileSync } = await import('node:fs');
const session = new (await import('node:inspector')).Session();
session.connect();
const post = (m: string, p?: object) => new Promise<any>((res, rej) => session.post(m, p ?? {}, (e, r) => (e ? rej(e) : res(r))));
planAt(st, dayOf(sc, 24, 0));
await post('Profiler.enable'); await post('Profiler.start');
for (let rep = 0; rep < 4; rep++) {
  const t = performance.now();
  planAt(st, dayOf(sc, 24, rep));
  const ms = performance.now() - t;
  console.log('series', n, 'ms', ms.toFixed(0), 'series/s', (n / ms * 1000).toFixed(0));
}
const { profile } = await post('Profiler.stop');
writeFileSync('/tmp/sense.cpuprofile', JSON.stringify(profile));
