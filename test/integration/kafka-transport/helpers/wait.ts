import type { KafkaPort } from '../../../../src/transport/kafka/kafka-port.ts';

export const sleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

let lastProgress = '';

export async function waitFor(what: string, check: () => boolean | Promise<boolean>, timeoutMs = 60_000, everyMs = 100): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what} (${lastProgress})`);
    await sleep(everyMs);
  }
}

/** End offset of each partition of `topic` (the offset the next record will get). */
export async function endOffsets(port: KafkaPort, topic: string): Promise<Map<number, bigint>> {
  const admin = await port.admin();
  try {
    return new Map((await admin.topicOffsets(topic)).map((o) => [o.partition, BigInt(o.high)]));
  } finally {
    await admin.close();
  }
}

/**
 * Whether the group's committed offsets reached the end of every partition of `topic`. A topic written by
 * transactions ends with commit markers no consumer commits past: pass `dataEnds` (last record offset + 1) then.
 */
export async function groupCaughtUp(port: KafkaPort, groupId: string, topic: string, dataEnds?: ReadonlyMap<number, bigint>): Promise<boolean> {
  const ends = dataEnds ?? (await endOffsets(port, topic));
  const admin = await port.admin();
  try {
    const committed = new Map((await admin.groupOffsets(groupId, topic)).map((o) => [o.partition, BigInt(o.offset)]));
    lastProgress = `${topic}: committed ${JSON.stringify([...committed].map(([p, o]) => `${p}:${o}`))} of ${JSON.stringify([...ends].map(([p, o]) => `${p}:${o}`))}`;
    return [...ends].every(([p, end]) => end === 0n || (committed.get(p) ?? -1n) >= end);
  } finally {
    await admin.close();
  }
}
