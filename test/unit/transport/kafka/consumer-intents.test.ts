import { describe, expect, it } from 'vitest';
import { ConsumerIntents, isClusterUnavailable, isGroupNotInitialised, type PartitionControls } from '../../../../src/transport/kafka/consumer-intents.ts';

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

// kafkajs's type declarations omit the constructors' options; the classes take them (src/errors.js).
type AnyError = new (...args: unknown[]) => Error & { retriable?: boolean };
const build = (ctor: unknown, ...args: unknown[]) => new (ctor as AnyError)(...args);

describe('which consumer crashes mean the cluster is away', () => {
  // kafkajs's own error classes, built as its retrier and cluster code build them (kafkajs 2.2.4 sources:
  // src/retry/index.js wraps the last error in a KafkaJSNonRetriableError; src/cluster/index.js throws
  // KafkaJSGroupCoordinatorNotFound once no broker names a coordinator).
  it('counts the crash seen after a broker restart, and connection failures, as the cluster being away', async () => {
    const k = await import('kafkajs');
    const lost = build(k.KafkaJSGroupCoordinatorNotFound, 'Failed to find group coordinator');
    const coordinator = build(k.KafkaJSNonRetriableError, lost, { cause: lost });
    expect(coordinator.retriable).toBe(false); // why kafkajs itself does not restart the consumer
    expect(isClusterUnavailable(coordinator)).toBe(true);
    const refused = build(k.KafkaJSConnectionError, 'Connection error: connect ECONNREFUSED 127.0.0.1:9092');
    expect(isClusterUnavailable(build(k.KafkaJSNonRetriableError, refused, { cause: refused }))).toBe(true);
    expect(isClusterUnavailable(build(k.KafkaJSProtocolError, { type: 'COORDINATOR_LOAD_IN_PROGRESS', code: 14, retriable: true, message: 'loading' }))).toBe(true);
  });

  it('lets configuration and authorisation failures stop the stage', async () => {
    const k = await import('kafkajs');
    const denied = build(k.KafkaJSSASLAuthenticationError, 'SASL PLAIN authentication failed');
    expect(isClusterUnavailable(build(k.KafkaJSNonRetriableError, denied, { cause: denied }))).toBe(false);
    expect(isClusterUnavailable(build(k.KafkaJSProtocolError, { type: 'GROUP_AUTHORIZATION_FAILED', code: 30, retriable: false, message: 'Not authorized to access group' }))).toBe(false);
    expect(isClusterUnavailable(new Error('Invalid topic'))).toBe(false);
  });
});
