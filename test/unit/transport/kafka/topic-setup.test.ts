import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../../../src/config/config.ts';
import { isNearcastError } from '../../../../src/errors.ts';
import type { AdminPort, ExistingTopic, TopicSpec } from '../../../../src/transport/kafka/kafka-port.ts';
import { ensureTopics, topicSpecs } from '../../../../src/transport/kafka/topic-setup.ts';

/** An admin over an in-memory cluster, to test the set-up's decisions without a broker. */
function memoryAdmin(initial: ExistingTopic[] = []) {
  const topics = new Map(initial.map((t) => [t.topic, { ...t, config: { ...t.config } }]));
  const calls: string[] = [];
  const admin: AdminPort = {
    listTopics: async () => [...topics.keys()],
    describeTopics: async (names) => names.map((n) => topics.get(n)!),
    createTopics: async (specs: readonly TopicSpec[]) => {
      for (const s of specs) topics.set(s.topic, { topic: s.topic, partitions: s.partitions, config: { ...s.config } });
      calls.push(`create ${specs.length}`);
    },
    alterTopicConfigs: async (topic, config) => {
      topics.get(topic)!.config = { ...config };
      calls.push(`alter ${topic}`);
    },
    createPartitions: async () => undefined,
    topicOffsets: async () => [],
    groupOffsets: async () => [],
    deleteTopics: async () => undefined,
    close: async () => undefined,
  };
  return { admin, topics, calls };
}

const config = loadConfig({ overrides: { kafka: { partitions: 4 } } });
const roles = { events: config.topics.events, changelog: config.topics.changelog };

describe('the topic set-up', () => {
  it('compacts plans, alerts and the changelog and deletes events and dead letters after a retention', () => {
    const byName = new Map(topicSpecs(config).map((s) => [s.topic, s]));
    for (const t of ['nearcast.plans.v1', 'nearcast.alerts.v1', 'nearcast.internal.changelog.v1']) expect(byName.get(t)!.config['cleanup.policy']).toBe('compact');
    for (const t of ['nearcast.internal.events.v1', 'nearcast.dead-letter.v1']) {
      expect(byName.get(t)!.config['cleanup.policy']).toBe('delete');
      expect(Number(byName.get(t)!.config['retention.ms'])).toBeGreaterThan(0);
    }
    expect(byName.size).toBe(12);
    for (const s of byName.values()) expect(s.partitions).toBe(4);
  });

  it('creates what is missing and changes nothing on a second run', async () => {
    const { admin, calls } = memoryAdmin();
    const first = await ensureTopics(admin, topicSpecs(config), roles);
    expect(first.created).toHaveLength(12);
    const second = await ensureTopics(admin, topicSpecs(config), roles);
    expect(second.created).toEqual([]);
    expect(second.updated).toEqual({});
    expect(second.unchanged).toHaveLength(12);
    expect(calls).toEqual(['create 12']);
  });

  it('puts a drifted cleanup policy back and keeps an operator override it does not own', async () => {
    const { admin, topics } = memoryAdmin();
    await ensureTopics(admin, topicSpecs(config), roles);
    topics.get('nearcast.plans.v1')!.config = { ...topics.get('nearcast.plans.v1')!.config, 'cleanup.policy': 'delete', 'compression.type': 'zstd' };
    const report = await ensureTopics(admin, topicSpecs(config), roles);
    expect(report.updated).toEqual({ 'nearcast.plans.v1': ['cleanup.policy'] });
    expect(topics.get('nearcast.plans.v1')!.config).toMatchObject({ 'cleanup.policy': 'compact', 'compression.type': 'zstd' });
  });

  it('warns about a partition count it will not change, and refuses an event log and changelog that differ', async () => {
    const { admin } = memoryAdmin([{ topic: config.topics.changelog, partitions: 2, config: {} }]);
    await expect(ensureTopics(admin, topicSpecs(config), roles)).rejects.toSatisfy(
      (e) => isNearcastError(e, 'NEARCAST_CONFIG_INVALID') && /has 4 partitions but the changelog .* has 2/.test((e as Error).message),
    );
  });
});
