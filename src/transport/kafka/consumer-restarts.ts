import type { Logger } from '../../log.ts';

// kafkajs restarts a crashed consumer only when it deems the error retriable; a cluster that is merely away (a broker
// restart) can still end in a "non-retriable" crash. Those are started again here, with a pause that doubles from
// 0.5 s up to 30 s, for as long as it takes (a join resets the pause); any other crash stops the stage.

export interface RestartTimers {
  set(run: () => void, ms: number): unknown;
  clear(handle: unknown): void;
}

const REAL_TIMERS: RestartTimers = {
  set: (run, ms) => setTimeout(run, ms),
  clear: (handle) => clearTimeout(handle as NodeJS.Timeout),
};

export const RESTART_FIRST_MS = 500;
export const RESTART_MAX_MS = 30_000;

export class ConsumerRestarts {
  private stopped = false;
  private timer: unknown;
  private attempts = 0;

  constructor(
    private readonly begin: () => Promise<void>,
    private readonly giveUp: (error: Error) => void,
    private readonly log: Logger,
    private readonly timers: RestartTimers = REAL_TIMERS,
  ) {}

  /** The client crashed; `restarting` is whether kafkajs itself starts it again. */
  crashed(error: Error, restarting: boolean): void {
    if (restarting || this.stopped) return;
    if (isClusterUnavailable(error)) this.later(error);
    else this.giveUp(error);
  }

  /** The consumer is in its group again. */
  joined(): void {
    this.attempts = 0;
  }

  stop(): void {
    this.stopped = true;
    if (this.timer !== undefined) this.timers.clear(this.timer);
    this.timer = undefined;
  }

  private later(error: unknown): void {
    const waitMs = Math.min(RESTART_MAX_MS, RESTART_FIRST_MS * 2 ** Math.min(this.attempts, 6));
    this.attempts++;
    this.log.warn({ err: error, waitMs, attempt: this.attempts }, 'the consumer lost the cluster; starting it again');
    this.timer = this.timers.set(() => {
      this.timer = undefined;
      if (this.stopped) return;
      this.begin().catch((err: unknown) => (isClusterUnavailable(err) ? this.later(err) : this.giveUp(err as Error)));
    }, waitMs);
  }
}

/** Errors (anywhere in the cause chain) that mean "the cluster is not answering right now", not "this cannot work". */
const UNAVAILABLE_NAMES = new Set([
  'KafkaJSConnectionError',
  'KafkaJSConnectionClosedError',
  'KafkaJSGroupCoordinatorNotFound',
  'KafkaJSBrokerNotFound',
  'KafkaJSRequestTimeoutError',
  'KafkaJSNumberOfRetriesExceeded',
  'KafkaJSMetadataNotLoaded',
]);
const UNAVAILABLE_TYPES = new Set([
  'COORDINATOR_NOT_AVAILABLE',
  'COORDINATOR_LOAD_IN_PROGRESS',
  'NOT_COORDINATOR',
  'LEADER_NOT_AVAILABLE',
  'NOT_LEADER_FOR_PARTITION',
  'REQUEST_TIMED_OUT',
  'NETWORK_EXCEPTION',
  'REBALANCE_IN_PROGRESS',
]);

/**
 * Whether a consumer crash came from the cluster being away (a broker restart, a coordinator moving). kafkajs gives
 * up on some of these for good ("Failed to find group coordinator" once its retries are spent); the port then starts
 * the consumer again itself, since giving up would leave the partitions unprocessed until someone restarts nearcast.
 */
export function isClusterUnavailable(error: unknown): boolean {
  let e: unknown = error;
  for (let depth = 0; depth < 6 && e && typeof e === 'object'; depth++) {
    const { name, type, retriable } = e as { name?: unknown; type?: unknown; retriable?: unknown };
    if (retriable === true) return true;
    if (typeof name === 'string' && UNAVAILABLE_NAMES.has(name)) return true;
    if (typeof type === 'string' && UNAVAILABLE_TYPES.has(type)) return true;
    if (e instanceof Error && /ECONNREFUSED|ECONNRESET|ETIMEDOUT|EHOSTUNREACH/.test(e.message)) return true;
    e = (e as { cause?: unknown; originalError?: unknown }).cause ?? (e as { originalError?: unknown }).originalError;
  }
  return false;
}
