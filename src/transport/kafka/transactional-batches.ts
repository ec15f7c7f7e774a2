import type { GroupConsumerOptions } from './kafka-port.ts';

/**
 * Consumer settings of a stage that commits every batch as one transaction (ingest and sensing). A transaction's
 * cost hardly depends on its size, so the broker may gather up to 256 KiB for at most 200 ms: a busy stream commits
 * a few large transactions rather than many small ones. Heartbeats at a fifth of the session timeout (at least
 * 0.5 s), so a short session still moves a dead member's partitions quickly.
 */
export function transactionalBatchOptions(settings: {
  readonly groupId: string;
  readonly topics: readonly string[];
  readonly sessionTimeoutMs: number;
  readonly partitionsConsumedConcurrently: number;
}): GroupConsumerOptions {
  return {
    groupId: settings.groupId,
    topics: settings.topics,
    fromBeginning: true,
    sessionTimeoutMs: settings.sessionTimeoutMs,
    heartbeatIntervalMs: Math.max(500, Math.floor(settings.sessionTimeoutMs / 5)),
    partitionsConsumedConcurrently: settings.partitionsConsumedConcurrently,
    maxWaitTimeMs: 200,
    minBytes: 262_144,
  };
}
