import { request } from 'node:https';
import { isIP, type LookupFunction } from 'node:net';
import { Counter, Gauge, type Registry } from 'prom-client';
import type { Alert } from '../contracts/alert.ts';
import { cloudEvent, deterministicId, toStructured } from '../contracts/cloudevents.ts';
import { SCHEMA_BASE_URI, schemaFileName } from '../contracts/json-schema.ts';
import { EVENT_TYPES } from '../contracts/records.ts';
import { isNearcastError, NearcastError } from '../errors.ts';
import type { Logger } from '../log.ts';
import { Backoff } from './backoff.ts';
import { BoundedQueue } from './bounded-queue.ts';
import { IDEMPOTENCY_HEADER, SIGNATURE_HEADER, sign, TIMESTAMP_HEADER } from './signature.ts';
import { parseTarget, systemResolver, vetTarget, type Resolver, type Target } from './target-policy.ts';

// Alert records to an optional webhook: CloudEvents structured mode over HTTPS, HMAC-signed, with an idempotency
// key per record (alertId and seq) so a receiver can drop the duplicates a retry may cause. Delivery never blocks
// the pipeline: `enqueue` returns at once; a bounded queue drops its oldest record (counted, logged) when a
// receiver is down for long. Redirects are never followed: a 3xx is a failed delivery.

export interface WebhookOptions {
  readonly url: string;
  /** HMAC key, at least 16 characters; never logged. */
  readonly secret: string;
  /** The one host (name or address, exactly as in the URL) that may be inside the network: a test receiver. */
  readonly allowPrivateHost?: string;
  /** Certificate authorities to trust instead of the system's, for a receiver with a private certificate. */
  readonly ca?: string | Buffer;
  readonly timeoutMs?: number;
  /** Attempts per record including the first. */
  readonly maxAttempts?: number;
  readonly baseDelayMs?: number;
  readonly maxDelayMs?: number;
  readonly queueCapacity?: number;
  /** Seed of the retry jitter. */
  readonly seed?: number;
  /** CloudEvents `source`. */
  readonly source?: string;
  readonly logger?: Logger;
  readonly registry?: Registry;
  readonly resolve?: Resolver;
  readonly now?: () => number;
}

export const WEBHOOK_DEFAULTS = Object.freeze({
  timeoutMs: 5_000, // 5 s per attempt
  maxAttempts: 6,
  baseDelayMs: 500, // first retry within 0.5 s, then 1, 2, 4, 8 s ceilings
  maxDelayMs: 30_000,
  queueCapacity: 1_000, // records
  seed: 1,
  source: '/nearcast/monitoring',
});

export interface WebhookStats {
  readonly queued: number;
  readonly delivered: number;
  /** Gave up after the last attempt, or the receiver answered with a redirect. */
  readonly failed: number;
  /** The receiver refused the record itself (4xx other than 408/425/429): retrying cannot help. */
  readonly rejected: number;
  /** The target resolved into the network: nothing was sent. */
  readonly refused: number;
  readonly dropped: number;
  readonly retries: number;
}

type Outcome = 'delivered' | 'failed' | 'rejected' | 'refused';

interface Metrics {
  readonly outcomes: Counter<'outcome'>;
  readonly retries: Counter;
  readonly dropped: Counter;
  readonly depth: Gauge;
}

export class WebhookDelivery {
  private readonly target: Target;
  private readonly o: Required<Omit<WebhookOptions, 'allowPrivateHost' | 'ca' | 'logger' | 'registry'>> & Pick<WebhookOptions, 'allowPrivateHost' | 'ca' | 'logger'>;
  private readonly queue: BoundedQueue<Alert>;
  private readonly backoff: Backoff;
  private readonly metrics: Metrics | null;
  private readonly counts = { delivered: 0, failed: 0, rejected: 0, refused: 0, retries: 0 };
  private inFlight = false;
  private closed = false;
  private wake: (() => void) | null = null;
  private idleWaiters: Array<() => void> = [];

  constructor(options: WebhookOptions) {
    this.target = parseTarget(options.url);
    if (typeof options.secret !== 'string' || options.secret.length < 16) {
      throw new NearcastError('NEARCAST_CONFIG_INVALID', ['webhook.secret: must be at least 16 characters']);
    }
    this.o = {
      ...WEBHOOK_DEFAULTS,
      resolve: systemResolver,
      now: () => Date.now(),
      ...Object.fromEntries(Object.entries(options).filter(([, v]) => v !== undefined)),
    } as WebhookDelivery['o'];
    this.queue = new BoundedQueue(this.o.queueCapacity);
    this.backoff = new Backoff(this.o, this.o.seed);
    this.metrics = options.registry ? createMetrics(options.registry) : null;
  }

  /** Queues a record for delivery and returns at once. */
  enqueue(alert: Alert): void {
    if (this.closed) return;
    const dropped = this.queue.push(alert);
    if (dropped) {
      this.metrics?.dropped.inc();
      this.o.logger?.warn({ alertId: dropped.alertId, seq: dropped.seq, dropped: this.queue.dropped, capacity: this.queue.capacity }, 'webhook queue full: dropped the oldest alert record');
    }
    this.metrics?.depth.set(this.queue.size);
    void this.pump();
  }

  stats(): WebhookStats {
    return { queued: this.queue.size + (this.inFlight ? 1 : 0), dropped: this.queue.dropped, ...this.counts };
  }

  /** Resolves once everything queued so far has been delivered or given up on. */
  idle(): Promise<void> {
    if (!this.inFlight && this.queue.size === 0) return Promise.resolve();
    return new Promise((resolve) => this.idleWaiters.push(resolve));
  }

  /** Stops delivering; records still queued are left undelivered (the alerts topic keeps them). */
  close(): void {
    this.closed = true;
    this.wake?.();
    this.settleIdle();
  }

  private async pump(): Promise<void> {
    if (this.inFlight) return;
    while (!this.closed) {
      const alert = this.queue.shift();
      if (!alert) break;
      this.inFlight = true;
      this.metrics?.depth.set(this.queue.size);
      const outcome = await this.deliver(alert);
      this.counts[outcome]++;
      this.metrics?.outcomes.inc({ outcome });
      this.inFlight = false;
    }
    this.settleIdle();
  }

  private settleIdle(): void {
    if (this.inFlight || (this.queue.size > 0 && !this.closed)) return;
    const waiters = this.idleWaiters;
    this.idleWaiters = [];
    for (const w of waiters) w();
  }

  private async deliver(alert: Alert): Promise<Outcome> {
    const key = `${alert.alertId}#${alert.seq}`;
    const event = cloudEvent(
      {
        id: deterministicId('alert', alert.alertId, alert.seq),
        source: this.o.source,
        type: EVENT_TYPES.alert,
        subject: alert.alertId,
        dataschema: `${SCHEMA_BASE_URI}${schemaFileName('alert')}`,
      },
      alert,
    );
    const { contentType, body } = toStructured(event);
    for (let attempt = 1; ; attempt++) {
      let retryAfterMs = 0;
      try {
        const address = await vetTarget(this.target, this.o.allowPrivateHost, this.o.resolve);
        const timestamp = Math.floor(this.o.now() / 1000);
        const res = await this.post(address, body, {
          'content-type': contentType,
          'content-length': String(Buffer.byteLength(body)),
          [IDEMPOTENCY_HEADER]: key,
          [TIMESTAMP_HEADER]: String(timestamp),
          [SIGNATURE_HEADER]: sign(this.o.secret, timestamp, body),
        });
        if (res.status >= 200 && res.status < 300) return 'delivered';
        if (res.status >= 300 && res.status < 400) {
          this.o.logger?.error({ key, status: res.status }, 'webhook receiver answered with a redirect, which is never followed');
          return 'failed';
        }
        if (!RETRIABLE_STATUS(res.status)) {
          this.o.logger?.error({ key, status: res.status }, 'webhook receiver rejected the alert record');
          return 'rejected';
        }
        retryAfterMs = res.retryAfterSec === null ? 0 : Math.min(this.o.maxDelayMs, res.retryAfterSec * 1000);
        this.o.logger?.warn({ key, status: res.status, attempt }, 'webhook receiver not ready');
      } catch (err) {
        if (isNearcastError(err, 'NEARCAST_WEBHOOK_REFUSED')) {
          this.o.logger?.error({ key, reason: err.message }, 'webhook target refused');
          return 'refused';
        }
        this.o.logger?.warn({ key, attempt, error: (err as Error).message }, 'webhook delivery attempt failed');
      }
      if (attempt >= this.o.maxAttempts || this.closed) {
        this.o.logger?.error({ key, attempts: attempt }, 'webhook delivery given up');
        return 'failed';
      }
      this.counts.retries++;
      this.metrics?.retries.inc();
      await this.sleep(Math.max(retryAfterMs, this.backoff.delayMs(attempt)));
      if (this.closed) return 'failed';
    }
  }

  private post(address: { address: string; family: 4 | 6 }, body: string, headers: Record<string, string>): Promise<{ status: number; retryAfterSec: number | null }> {
    const { url, hostname } = this.target;
    // Connect to the vetted address only, whatever a second resolution would say.
    const pinned: LookupFunction = (_host, opts, cb) => {
      if ((opts as { all?: boolean }).all) (cb as unknown as (e: null, a: Array<{ address: string; family: number }>) => void)(null, [address]);
      else cb(null, address.address, address.family);
    };
    return new Promise((resolve, reject) => {
      const req = request(
        {
          host: hostname,
          port: url.port === '' ? 443 : Number(url.port),
          path: `${url.pathname}${url.search}`,
          method: 'POST',
          headers,
          lookup: pinned,
          agent: false,
          ...(isIP(hostname) === 0 ? { servername: hostname } : {}),
          ...(this.o.ca !== undefined ? { ca: this.o.ca } : {}),
        },
        (res) => {
          res.resume();
          res.on('end', () => {
            clearTimeout(timer);
            const ra = Number(res.headers['retry-after']);
            resolve({ status: res.statusCode ?? 0, retryAfterSec: Number.isFinite(ra) && ra >= 0 ? ra : null });
          });
          res.on('error', reject);
        },
      );
      const timer = setTimeout(() => req.destroy(new Error(`no answer within ${this.o.timeoutMs} ms`)), this.o.timeoutMs);
      req.on('error', (err) => {
        clearTimeout(timer);
        reject(err);
      });
      req.end(body);
    });
  }

  private sleep(ms: number): Promise<void> {
    return new Promise((resolve) => {
      const done = (): void => {
        clearTimeout(t);
        this.wake = null;
        resolve();
      };
      const t = setTimeout(done, ms);
      this.wake = done;
    });
  }
}

// 408 Request Timeout, 425 Too Early, 429 Too Many Requests and server errors may pass on a later attempt.
const RETRIABLE_STATUS = (s: number): boolean => s === 408 || s === 425 || s === 429 || s >= 500;

function createMetrics(registry: Registry): Metrics {
  return {
    outcomes: new Counter({ name: 'nearcast_webhook_deliveries_total', help: 'Alert records by webhook delivery outcome', labelNames: ['outcome'], registers: [registry] }),
    retries: new Counter({ name: 'nearcast_webhook_retries_total', help: 'Webhook delivery retries', registers: [registry] }),
    dropped: new Counter({ name: 'nearcast_webhook_dropped_total', help: 'Alert records dropped because the webhook queue was full', registers: [registry] }),
    depth: new Gauge({ name: 'nearcast_webhook_queue_depth', help: 'Alert records waiting for webhook delivery', registers: [registry] }),
  };
}
