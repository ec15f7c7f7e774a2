import type { Config } from '../../../../src/config/config.ts';
import type { KafkaPort } from '../../../../src/transport/kafka/kafka-port.ts';
import { startSensingChild } from './child-process.ts';
import { eventLogMessages, keyedLines, produce, readAll, replayInMemory, setUpTopics, testPort, transportConfig } from './harness.ts';
import { eventLogScenario } from './scenario.ts';
import { createTallyStage } from './tally-stage.ts';
import { groupCaughtUp, sleep, waitFor } from './wait.ts';

// One crash-safety run: the event log is written in waves while a sensing child runs with a crash point set; the
// child dies at it (SIGKILL, no clean-up); a second child takes over; the plans topic must then hold exactly what an
// uninterrupted, in-memory application of the same event log publishes — nothing lost, nothing counted twice.

export const PAD = 24_000; // snapshots above the 16 KiB test limit: restores exercise multi-part values
export const tally = (p: number) => createTallyStage(p, { padBytes: PAD });

export interface CrashRunOptions {
  readonly label: string;
  readonly crashAt: string;
  /** Run a clean child over the first half of the log first, so the crashing child has a changelog to restore. */
  readonly restoreFirst?: boolean;
  readonly seed?: number;
}

export interface CrashRunResult {
  readonly crashSignal: NodeJS.Signals | null;
  readonly actual: string[];
  readonly expected: string[];
  readonly manifests: number;
}

export async function waitCaughtUp(port: KafkaPort, config: Config, timeoutMs = 60_000): Promise<void> {
  await waitFor('the sensing group to reach the end of the event log', () => groupCaughtUp(port, config.kafka.groupId, config.topics.events), timeoutMs, 200);
}

export async function crashRun(opts: CrashRunOptions): Promise<CrashRunResult> {
  const config = transportConfig(`crash-${opts.label}`);
  const port = testPort(config);
  await setUpTopics(config, port);
  const messages = eventLogMessages(config, eventLogScenario(opts.seed ?? 11, 4, 30));
  const waves: (typeof messages)[] = [];
  for (let i = 0; i < messages.length; i += 12) waves.push(messages.slice(i, i + 12));
  const env = { NEARCAST_TEST_PAD: String(PAD) };
  try {
    let next = 0;
    if (opts.restoreFirst) {
      const half = Math.floor(waves.length / 2);
      await produce(port, waves.slice(0, half).flat());
      next = half;
      const clean = startSensingChild(config, env);
      await clean.ready();
      await waitCaughtUp(port, config);
      await clean.terminate();
    }
    const crashing = startSensingChild(config, { ...env, NEARCAST_CRASH_AT: opts.crashAt });
    await crashing.ready().catch(() => undefined); // a restore crash may come before "ready" is read
    for (; next < waves.length; next++) {
      await produce(port, waves[next]!);
      await sleep(150);
    }
    const exit = await Promise.race([crashing.exited, sleep(30_000).then(() => null)]);
    if (exit === null) await crashing.kill();
    const survivor = startSensingChild(config, env);
    await survivor.ready();
    await waitCaughtUp(port, config);
    await survivor.terminate();

    const events = await readAll(port, config.topics.events);
    const expected = replayInMemory(events, tally, config.topics).get(config.topics.plans) ?? [];
    const actual = keyedLines(await readAll(port, config.topics.plans));
    return { crashSignal: exit?.signal ?? null, actual, expected, manifests: expected.filter((l) => l.includes('|#manifest|')).length };
  } finally {
    const admin = await port.admin();
    await admin.deleteTopics(Object.values(config.topics)).catch(() => undefined);
    await admin.close();
  }
}
