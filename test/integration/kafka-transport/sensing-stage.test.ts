import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Config } from '../../../src/config/config.ts';
import type { KafkaPort } from '../../../src/transport/kafka/kafka-port.ts';
import { serveKafka } from '../../../src/transport/kafka/serve-kafka.ts';
import { decodeChangelog } from '../../../src/transport/kafka/changelog-codec.ts';
import { eventLogMessages, keyedLines, produce, readAll, replayInMemory, setUpTopics, testLogger, testPort, transportConfig } from './helpers/harness.ts';
import { eventLogScenario } from './helpers/scenario.ts';
import { createTallyStage } from './helpers/tally-stage.ts';
import { groupCaughtUp, waitFor } from './helpers/wait.ts';

// The sensing stage's transaction machinery with a stage that sums every order line it is given (no natural-key
// de-duplication): exactly-once effect is then visible in the published totals. The reference is the same event log
// applied in memory by a fresh stage — the values are worked out independently of the Kafka path.

const PAD = 40_000; // snapshot bytes: above the 16 KiB test message limit, so every snapshot is split in parts
const stage = (p: number) => createTallyStage(p, { padBytes: PAD });

describe('the sensing stage over Kafka', () => {
  let config: Config;
  let port: KafkaPort;

  beforeAll(async () => {
    config = transportConfig('sensing');
    port = testPort(config);
    await setUpTopics(config, port);
  });

  afterAll(async () => {
    const admin = await port.admin();
    await admin.deleteTopics(Object.values(config.topics)).catch(() => undefined);
    await admin.close();
  });

  // The scenario's records carry March times: a wall clock would add months of deadline closes.
  async function runUntilCaughtUp(): Promise<void> {
    const service = await serveKafka(config, testLogger(config), { stages: ['sensing'], createStage: stage, handleSignals: false, setUpTopics: false, port, clock: false });
    try {
      await waitFor('the sensing group to reach the end of the event log', () => groupCaughtUp(port, config.kafka.groupId, config.topics.events));
    } finally {
      await service.stop();
    }
  }

  it('publishes exactly the plans and manifests an in-memory replay of the same event log publishes', async () => {
    await produce(port, eventLogMessages(config, eventLogScenario(7, 3, 60)));
    await runUntilCaughtUp();
    const events = await readAll(port, config.topics.events);
    const expected = replayInMemory(events, stage, config.topics).get(config.topics.plans)!;
    // 3 days × 3 locations: one manifest per close (each location gets order lines on every day at this volume).
    expect(expected.filter((l) => l.includes('|#manifest|')).length).toBe(9);
    expect(keyedLines(await readAll(port, config.topics.plans))).toEqual(expected);
  });

  it('splits snapshots above the message limit into parts that restore to the whole snapshot', async () => {
    const changelog = await readAll(port, config.topics.changelog);
    expect(changelog.some((m) => m.key?.includes('\u001f'))).toBe(true);
    const { entries } = decodeChangelog(changelog);
    const north = entries.find((e) => e.key === 'DC-NORTH');
    expect(north?.value?.length).toBeGreaterThan(PAD);
    expect(JSON.parse(north!.value!).pad).toHaveLength(PAD);
  });

  it('restores the state from the changelog on restart and goes on from the applied offset without re-applying', async () => {
    // Day 4 and 5 appended to the same log: a restarted stage must start from its restored totals.
    const more = eventLogScenario(7, 5, 60).slice(eventLogScenario(7, 3, 60).length);
    await produce(port, eventLogMessages(config, more));
    await runUntilCaughtUp();
    const events = await readAll(port, config.topics.events);
    const expected = replayInMemory(events, stage, config.topics).get(config.topics.plans)!;
    expect(expected.filter((l) => l.includes('|#manifest|')).length).toBe(15);
    expect(keyedLines(await readAll(port, config.topics.plans))).toEqual(expected);
  });
});
