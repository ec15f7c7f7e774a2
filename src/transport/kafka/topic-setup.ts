import type { Config } from '../../config/config.ts';
import type { Topics } from '../../config/topics.ts';
import { NearcastError } from '../../errors.ts';
import type { AdminPort, TopicSpec } from './kafka-port.ts';

// The topic set-up: every topic nearcast reads or writes, with its partitions and cleanup policy. Idempotent: a
// second run creates nothing and changes nothing; drifted settings are put back, other overrides are kept.

const DAY_MS = 86_400_000;

/** Cleanup settings per topic role (values are Kafka topic configs, as strings). */
const COMPACTED = {
  'cleanup.policy': 'compact',
  // Keep tombstones a day so a consumer that reads the topic daily still sees deletions.
  'delete.retention.ms': String(DAY_MS),
  // Compact eagerly: consumers bootstrap from these topics, so a smaller log means a faster start.
  'min.cleanable.dirty.ratio': '0.1',
  'segment.ms': String(6 * 3_600_000), // 6 h: only closed segments are cleaned
  'min.compaction.lag.ms': '0',
} as const;

function deleteAfter(days: number): Record<string, string> {
  return { 'cleanup.policy': 'delete', 'retention.ms': String(days * DAY_MS) };
}

type TopicRole = keyof Topics;

/** Why each topic has the policy it has; the topic-set-up command prints it. */
export const TOPIC_POLICY: Record<TopicRole, { readonly config: Readonly<Record<string, string>>; readonly why: string }> = {
  orders: { config: deleteAfter(14), why: 'input; the event log keeps what was accepted' },
  shipments: { config: deleteAfter(14), why: 'input' },
  baselines: { config: deleteAfter(14), why: 'input' },
  dayCloses: { config: deleteAfter(14), why: 'input' },
  locations: { config: COMPACTED, why: 'master data: the latest record per location is what counts' },
  commands: { config: deleteAfter(14), why: 'acknowledge/snooze/resolve; copied into the event log by the ingest stage' },
  events: { config: deleteAfter(90), why: 'the event log: replayable history, kept 90 days (longer than lookback plus horizon)' },
  changelog: { config: { ...COMPACTED, 'segment.ms': String(3_600_000) }, why: 'state changelog: the last snapshot per key restores a partition' },
  plans: { config: COMPACTED, why: 'latest plan per location|item and manifest per location|#manifest' },
  alerts: { config: COMPACTED, why: 'latest state per location|item|rule|episodeStart' },
  accuracy: { config: COMPACTED, why: 'latest summary per location|lead|volumeBand' },
  deadLetter: { config: deleteAfter(30), why: 'quarantined records, replayable for 30 days' },
};

export function topicSpecs(config: Pick<Config, 'topics' | 'kafka'>): TopicSpec[] {
  return (Object.keys(TOPIC_POLICY) as TopicRole[]).map((role) => ({
    topic: config.topics[role],
    partitions: config.kafka.partitions,
    replicationFactor: config.kafka.replicationFactor,
    config: {
      ...TOPIC_POLICY[role].config,
      // A transactional chunk is sent as one record batch; the topic must accept the largest one we build.
      'max.message.bytes': String(Math.max(1_048_588, config.kafka.maxMessageBytes + 65_536)),
    },
  }));
}

export interface TopicSetupReport {
  readonly created: readonly string[];
  /** Topics whose settings were put back to ours (name → changed settings). */
  readonly updated: Readonly<Record<string, readonly string[]>>;
  readonly unchanged: readonly string[];
  /** Things we will not change by ourselves (fewer or more partitions than configured). */
  readonly warnings: readonly string[];
}

/**
 * Creates missing topics and corrects drifted settings. Refuses (NEARCAST_CONFIG_INVALID) when the event log and the
 * changelog have different partition counts: a partition's state lives in the changelog partition of the same number.
 */
export async function ensureTopics(admin: AdminPort, specs: readonly TopicSpec[], roles?: { events: string; changelog: string }): Promise<TopicSetupReport> {
  const existing = new Set(await admin.listTopics());
  const missing = specs.filter((s) => !existing.has(s.topic));
  const present = specs.filter((s) => existing.has(s.topic));
  if (missing.length > 0) await admin.createTopics(missing);

  const described = present.length > 0 ? await admin.describeTopics(present.map((s) => s.topic)) : [];
  const updated: Record<string, string[]> = {};
  const unchanged: string[] = [];
  const warnings: string[] = [];
  for (const spec of present) {
    const now = described.find((d) => d.topic === spec.topic);
    if (!now) continue;
    if (now.partitions !== spec.partitions) {
      warnings.push(
        `${spec.topic} has ${now.partitions} partitions, configured ${spec.partitions}; left as it is (changing the count moves locations between partitions)`,
      );
    }
    const drift = Object.entries(spec.config).filter(([k, v]) => now.config[k] !== v).map(([k]) => k);
    if (drift.length === 0) {
      unchanged.push(spec.topic);
      continue;
    }
    await admin.alterTopicConfigs(spec.topic, { ...now.config, ...spec.config });
    updated[spec.topic] = drift;
  }

  if (roles) {
    const counts = new Map<string, number>(specs.map((s) => [s.topic, s.partitions]));
    for (const d of described) counts.set(d.topic, d.partitions);
    const e = counts.get(roles.events);
    const c = counts.get(roles.changelog);
    if (e !== undefined && c !== undefined && e !== c) {
      throw new NearcastError('NEARCAST_CONFIG_INVALID', [
        `topics: the event log ${roles.events} has ${e} partitions but the changelog ${roles.changelog} has ${c}; they must be equal`,
      ]);
    }
  }
  return { created: missing.map((s) => s.topic), updated, unchanged, warnings };
}
