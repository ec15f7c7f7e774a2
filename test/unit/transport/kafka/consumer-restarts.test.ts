import { describe, expect, it } from 'vitest';
import { createLogger } from '../../../../src/log.ts';
import { ConsumerRestarts, isClusterUnavailable, RESTART_FIRST_MS, RESTART_MAX_MS, type RestartTimers } from '../../../../src/transport/kafka/consumer-restarts.ts';

/** Timers run by hand: each set() is queued with its delay, run() fires the oldest. */
class HandTimers implements RestartTimers {
  queue: { run: () => void; ms: number; id: number }[] = [];
  private next = 0;
  set(run: () => void, ms: number) {
    const id = this.next++;
    this.queue.push({ run, ms, id });
    return id;
  }
  clear(handle: unknown) {
    this.queue = this.queue.filter((t) => t.id !== handle);
  }
  async run(): Promise<number> {
    const t = this.queue.shift();
    if (!t) throw new Error('no timer queued');
    t.run();
    await new Promise((r) => setImmediate(r)); // let the begin() promise settle
    return t.ms;
  }
}

const quiet = createLogger('silent');
const away = () => Object.assign(new Error('Failed to find group coordinator'), { name: 'KafkaJSGroupCoordinatorNotFound', retriable: false });

describe('restarting a consumer that lost the cluster', () => {
  it('starts it again, doubling the pause while the cluster stays away, and resets the pause once it joins', async () => {
    const timers = new HandTimers();
    let begins = 0;
    const failuresBeforeBack = 3;
    const gaveUp: Error[] = [];
    const restarts = new ConsumerRestarts(
      async () => {
        begins++;
        if (begins <= failuresBeforeBack) throw away();
      },
      (e) => gaveUp.push(e),
      quiet,
      timers,
    );
    restarts.crashed(away(), false);
    const waits: number[] = [];
    while (timers.queue.length > 0) waits.push(await timers.run());
    // 0.5 s, then 1, 2, 4 s: three failed starts and the fourth that stays up.
    expect(waits).toEqual([RESTART_FIRST_MS, 2 * RESTART_FIRST_MS, 4 * RESTART_FIRST_MS, 8 * RESTART_FIRST_MS]);
    expect(begins).toBe(4);
    expect(gaveUp).toEqual([]);
    restarts.joined();
    restarts.crashed(away(), false);
    expect(timers.queue.map((t) => t.ms)).toEqual([RESTART_FIRST_MS]);
  });

  it('never waits more than the cap between two starts', async () => {
    const timers = new HandTimers();
    const restarts = new ConsumerRestarts(async () => Promise.reject(away()), () => undefined, quiet, timers);
    restarts.crashed(away(), false);
    const waits: number[] = [];
    for (let i = 0; i < 10; i++) waits.push(await timers.run());
    expect(Math.max(...waits)).toBe(RESTART_MAX_MS);
    expect(waits.slice(-3)).toEqual([RESTART_MAX_MS, RESTART_MAX_MS, RESTART_MAX_MS]);
  });

  it('leaves restarts kafkajs does itself alone, stops the stage on other errors, and does nothing once stopped', async () => {
    const timers = new HandTimers();
    const gaveUp: Error[] = [];
    const restarts = new ConsumerRestarts(async () => undefined, (e) => gaveUp.push(e), quiet, timers);
    restarts.crashed(away(), true);
    expect(timers.queue).toHaveLength(0);
    const denied = Object.assign(new Error('Not authorized to access group'), { type: 'GROUP_AUTHORIZATION_FAILED', retriable: false });
    restarts.crashed(denied, false);
    expect(gaveUp).toEqual([denied]);
    restarts.crashed(away(), false);
    expect(timers.queue).toHaveLength(1);
    restarts.stop();
    expect(timers.queue).toHaveLength(0);
    restarts.crashed(away(), false);
    expect(timers.queue).toHaveLength(0);
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
