import { describe, expect, it } from 'vitest';
import { ConsumerIntents, isGroupNotInitialised, type PartitionControls } from '../../../../src/transport/kafka/consumer-intents.ts';

// A stand-in for the three calls of a kafkajs consumer, behaving as kafkajs 2.2.4 does across a crash and restart:
// while it has no group object every call throws "Consumer group was not initialized"; a restart starts a new group
// object that has nothing paused and no seek pending.
class RestartingConsumer implements PartitionControls {
  group: { paused: Set<string>; seeks: Map<string, string> } | null = { paused: new Set(), seeks: new Map() };
  private live() {
    if (!this.group) throw new Error('Consumer group was not initialized, consumer#run must be called first');
    return this.group;
  }
  pause(ps: { topic: string; partitions: number[] }[]) {
    const g = this.live();
    for (const p of ps) for (const n of p.partitions) g.paused.add(`${p.topic}/${n}`);
  }
  resume(ps: { topic: string; partitions: number[] }[]) {
    const g = this.live();
    for (const p of ps) for (const n of p.partitions) g.paused.delete(`${p.topic}/${n}`);
  }
  seek(t: { topic: string; partition: number; offset: string }) {
    this.live().seeks.set(`${t.topic}/${t.partition}`, t.offset);
  }
  crash() {
    this.group = null;
  }
  restart() {
    this.group = { paused: new Set(), seeks: new Map() };
  }
}

const tp = (partition: number) => ({ topic: 'events', partition });

describe('consumer intents across a client restart', () => {
  it('pauses again at the next join what the stage paused before the restart', () => {
    const c = new RestartingConsumer();
    const intents = new ConsumerIntents(c);
    intents.pause([tp(0), tp(2)]);
    intents.resume([tp(2)]);
    c.crash();
    c.restart();
    expect(c.group!.paused.size).toBe(0); // what kafkajs itself keeps
    intents.rejoined();
    expect([...c.group!.paused]).toEqual(['events/0']);
  });

  it('takes pause, resume and seek while the client has no group, and applies them at the join', () => {
    const c = new RestartingConsumer();
    const intents = new ConsumerIntents(c);
    c.crash();
    expect(() => intents.pause([tp(1)])).not.toThrow();
    expect(() => intents.seek(tp(1), '42')).not.toThrow();
    expect(() => intents.resume([tp(3)])).not.toThrow();
    expect(intents.isPaused(tp(1))).toBe(true);
    c.restart();
    intents.rejoined();
    expect([...c.group!.paused]).toEqual(['events/1']);
    expect(c.group!.seeks.get('events/1')).toBe('42');
    // A seek applied once is not repeated at a later join (a later one would move the position back).
    c.group!.seeks.clear();
    intents.rejoined();
    expect(c.group!.seeks.size).toBe(0);
  });

  it('lets a later seek replace a missed one, and passes other errors on', () => {
    const c = new RestartingConsumer();
    const intents = new ConsumerIntents(c);
    c.crash();
    intents.seek(tp(0), '5');
    c.restart();
    intents.seek(tp(0), '9');
    intents.rejoined();
    expect(c.group!.seeks.get('events/0')).toBe('9');
    const broken: PartitionControls = { pause: () => { throw new Error('Invalid topic'); }, resume: () => undefined, seek: () => undefined };
    expect(() => new ConsumerIntents(broken).pause([tp(0)])).toThrow('Invalid topic');
    expect(isGroupNotInitialised(new Error('Consumer group was not initialized, consumer#run must be called first'))).toBe(true);
  });
});
