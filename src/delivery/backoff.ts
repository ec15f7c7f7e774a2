import { createRng, type Rng } from '../stats/random.ts';

// Exponential backoff with "full jitter": wait a uniform random time in [0, min(cap, base·2^(attempt−1))]
// (common practice; it spreads the retries of many senders after a receiver outage). Seedable, so tests and
// replays see the same waits.

export interface BackoffSettings {
  readonly baseDelayMs: number;
  readonly maxDelayMs: number;
}

export class Backoff {
  private readonly rng: Rng;

  constructor(
    private readonly settings: BackoffSettings,
    seed: number,
  ) {
    this.rng = createRng(seed);
  }

  /** Wait before retry number `attempt` (1 = the first retry). */
  delayMs(attempt: number): number {
    const ceiling = Math.min(this.settings.maxDelayMs, this.settings.baseDelayMs * 2 ** Math.max(0, attempt - 1));
    return Math.floor(this.rng.next() * ceiling);
  }
}
