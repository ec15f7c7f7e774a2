import { describe, expect, it } from 'vitest';
import { CRASH_POINTS } from '../../src/transport/kafka/crash-points.ts';
import { crashRun } from '../../test/integration/kafka-transport/helpers/crash-run.ts';
import { seeded } from '../../test/integration/kafka-transport/helpers/scenario.ts';

// The long crash campaign (opt-in; npm test runs the short version in test/integration/kafka-transport):
// NEARCAST_CRASH_RUNS kills (default 24) at seeded points over every crash point and pass numbers 1..8.
//   node scripts/bench/kafka-crash-campaign.mjs        (NEARCAST_CRASH_SEED, NEARCAST_CRASH_RUNS to vary)

const RUNS = Number(process.env.NEARCAST_CRASH_RUNS ?? 24);
const SEED = Number(process.env.NEARCAST_CRASH_SEED ?? 424_242);
const RESTORE_POINTS = new Set(['after-barrier', 'during-restore']);
const rnd = seeded(SEED);
const cases = Array.from({ length: RUNS }, (_, i) => {
  const point = CRASH_POINTS[i < CRASH_POINTS.length ? i : Math.floor(rnd() * CRASH_POINTS.length)]!;
  return { point, spec: `${point}:${1 + Math.floor(rnd() * (RESTORE_POINTS.has(point) ? 3 : 8))}`, seed: 100 + i };
});

describe(`crash campaign (seed ${SEED}, ${RUNS} kills)`, () => {
  it.each(cases)('a kill at $spec (log seed $seed) leaves the plans exactly as an uninterrupted run', async ({ point, spec, seed }) => {
    const run = await crashRun({ label: `campaign-${point}`, crashAt: spec, restoreFirst: RESTORE_POINTS.has(point), seed });
    // A pass number beyond the run's transactions means no kill happened; the comparison must hold all the same.
    expect([null, 'SIGKILL']).toContain(run.crashSignal);
    expect(run.actual).toEqual(run.expected);
  });
});
