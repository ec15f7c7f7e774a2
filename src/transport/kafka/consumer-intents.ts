import type { TopicPartition } from './kafka-port.ts';

// kafkajs restarts a crashed consumer (a broker restart is enough) with a fresh internal group object: the partitions
// paused on the old one are fetched again, pending seeks are forgotten, and in the moments between the crash and the
// restart pause, resume and seek throw "Consumer group was not initialized". A partition being restored would then be
// fetched before its state exists, or its owner would fail half-way through taking it back and never fetch again.
// So the port remembers what the stages asked for and applies it again on every join, before the first fetch.

/** The part of a kafkajs consumer these calls go to. */
export interface PartitionControls {
  pause(partitions: { topic: string; partitions: number[] }[]): void;
  resume(partitions: { topic: string; partitions: number[] }[]): void;
  seek(target: { topic: string; partition: number; offset: string }): void;
}

const key = (tp: TopicPartition) => `${tp.partition}|${tp.topic}`;

/** True for the error kafkajs throws while it has no group object (before run, or between a crash and the restart). */
export function isGroupNotInitialised(err: unknown): boolean {
  return err instanceof Error && /consumer group was not initiali[sz]ed/i.test(err.message);
}

function byTopic(partitions: readonly TopicPartition[]): { topic: string; partitions: number[] }[] {
  const out = new Map<string, number[]>();
  for (const { topic, partition } of partitions) out.set(topic, [...(out.get(topic) ?? []), partition]);
  return [...out].map(([topic, ps]) => ({ topic, partitions: ps }));
}

export class ConsumerIntents {
  private readonly paused = new Map<string, TopicPartition>();
  /** Seeks asked for while the client could not take them; applied at the next join. */
  private readonly seeks = new Map<string, { tp: TopicPartition; offset: string }>();

  constructor(private readonly controls: PartitionControls) {}

  pause(partitions: readonly TopicPartition[]): void {
    for (const tp of partitions) this.paused.set(key(tp), tp);
    this.attempt(() => this.controls.pause(byTopic(partitions)));
  }

  resume(partitions: readonly TopicPartition[]): void {
    for (const tp of partitions) this.paused.delete(key(tp));
    this.attempt(() => this.controls.resume(byTopic(partitions)));
  }

  seek(tp: TopicPartition, offset: string): void {
    this.seeks.delete(key(tp));
    if (!this.attempt(() => this.controls.seek({ topic: tp.topic, partition: tp.partition, offset }))) this.seeks.set(key(tp), { tp, offset });
  }

  /** At every join, before the new generation fetches: pauses again what should stay paused, and the missed seeks. */
  rejoined(): void {
    const paused = [...this.paused.values()];
    if (paused.length > 0) this.controls.pause(byTopic(paused));
    for (const { tp, offset } of this.seeks.values()) this.controls.seek({ topic: tp.topic, partition: tp.partition, offset });
    this.seeks.clear();
  }

  isPaused(tp: TopicPartition): boolean {
    return this.paused.has(key(tp));
  }

  private attempt(call: () => void): boolean {
    try {
      call();
      return true;
    } catch (err) {
      if (isGroupNotInitialised(err)) return false;
      throw err;
    }
  }
}
