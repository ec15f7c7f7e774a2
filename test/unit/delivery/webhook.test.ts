import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { createServer, type Server } from 'node:https';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Writable } from 'node:stream';
import { Registry } from 'prom-client';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Alert } from '../../../src/contracts/alert.ts';
import { Backoff } from '../../../src/delivery/backoff.ts';
import { IDEMPOTENCY_HEADER, SIGNATURE_HEADER, TIMESTAMP_HEADER, verifySignature } from '../../../src/delivery/signature.ts';
import { isRefusedAddress } from '../../../src/delivery/target-policy.ts';
import { WebhookDelivery, type WebhookOptions } from '../../../src/delivery/webhook.ts';
import { createLogger } from '../../../src/log.ts';
import { monitorDay } from '../../../src/monitoring/monitor-day.ts';
import { businessDates, dayInput, quiet } from '../monitoring/helpers.ts';

// A real HTTPS receiver on 127.0.0.1 with a certificate made for this run, trusted through the client's `ca`
// option. Each test scripts the receiver: down, slow, flaky, redirecting or refusing.

const SECRET = 'test-secret-0123456789';
let dir = '';
let key = '';
let cert = '';

beforeAll(() => {
  dir = mkdtempSync(path.join(tmpdir(), 'nearcast-webhook-'));
  execFileSync('openssl', [
    'req', '-x509', '-newkey', 'ec', '-pkeyopt', 'ec_paramgen_curve:prime256v1', '-nodes', '-days', '1',
    '-subj', '/CN=127.0.0.1', '-addext', 'subjectAltName=IP:127.0.0.1',
    '-keyout', path.join(dir, 'key.pem'), '-out', path.join(dir, 'cert.pem'),
  ], { stdio: 'ignore' });
  key = readFileSync(path.join(dir, 'key.pem'), 'utf8');
  cert = readFileSync(path.join(dir, 'cert.pem'), 'utf8');
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface Seen {
  readonly url: string;
  readonly headers: Record<string, string | string[] | undefined>;
  readonly body: string;
}

type Behaviour = (n: number) => { status: number; delayMs?: number; headers?: Record<string, string> };

async function receiver(behave: Behaviour, port = 0): Promise<{ server: Server; port: number; seen: Seen[] }> {
  const seen: Seen[] = [];
  const server = createServer({ key, cert }, (req, res) => {
    let body = '';
    req.on('data', (c: Buffer) => (body += c.toString('utf8')));
    req.on('end', () => {
      seen.push({ url: req.url ?? '', headers: req.headers, body });
      const b = behave(seen.length);
      const t = setTimeout(() => {
        res.writeHead(b.status, b.headers ?? {});
        res.end();
      }, b.delayMs ?? 0);
      res.on('close', () => clearTimeout(t));
    });
  });
  await new Promise<void>((resolve) => server.listen(port, '127.0.0.1', resolve));
  return { server, port: (server.address() as AddressInfo).port, seen };
}

const stop = (server: Server) =>
  new Promise<void>((resolve) => {
    server.closeAllConnections();
    server.close(() => resolve());
  });

function alerts(n: number): Alert[] {
  const d = businessDates('2026-03-02', 1)[0]!;
  const spikes = Array.from({ length: n }, (_, i) => ({ item: `SPARK-LEMON-${i}`, intake: 160, expected: 40 }));
  return monitorDay(null, dayInput(d, [...quiet(4), ...spikes])).alerts.filter((a) => a.scope === 'series');
}

function client(port: number, extra: Partial<WebhookOptions> = {}) {
  return new WebhookDelivery({ url: `https://127.0.0.1:${port}/hooks/alerts`, secret: SECRET, allowPrivateHost: '127.0.0.1', ca: cert, timeoutMs: 300, baseDelayMs: 10, maxDelayMs: 40, seed: 7, ...extra });
}

describe('webhook delivery', () => {
  it('posts each alert record as a signed CloudEvent with an idempotency key of alertId and seq', async () => {
    const r = await receiver(() => ({ status: 204 }));
    const [alert] = alerts(1);
    const hook = client(r.port);
    hook.enqueue(alert!);
    await hook.idle();
    await stop(r.server);
    expect(r.seen).toHaveLength(1);
    const { headers, body, url } = r.seen[0]!;
    expect(url).toBe('/hooks/alerts');
    expect(headers['content-type']).toBe('application/cloudevents+json');
    expect(headers[IDEMPOTENCY_HEADER]).toBe(`${alert!.alertId}#1`);
    // The receiver checks the signature with the shared secret over "<timestamp>.<body>".
    expect(verifySignature(SECRET, headers[TIMESTAMP_HEADER] as string, body, headers[SIGNATURE_HEADER] as string, Math.floor(Date.now() / 1000))).toBe(true);
    expect(verifySignature('another-secret-000000', headers[TIMESTAMP_HEADER] as string, body, headers[SIGNATURE_HEADER] as string, Math.floor(Date.now() / 1000))).toBe(false);
    const event = JSON.parse(body);
    expect(event).toMatchObject({ specversion: '1.0', type: 'io.nearcast.alert.v1', subject: alert!.alertId, data: { alertId: alert!.alertId, seq: 1 } });
    expect(hook.stats()).toMatchObject({ delivered: 1, retries: 0, queued: 0 });
  });

  it('retries a flaky receiver with backoff until it accepts, sending the same idempotency key each time', async () => {
    const r = await receiver((n) => ({ status: n <= 2 ? 503 : 200 }));
    const registry = new Registry();
    const hook = client(r.port, { registry });
    hook.enqueue(alerts(1)[0]!);
    await hook.idle();
    await stop(r.server);
    expect(r.seen).toHaveLength(3);
    expect(new Set(r.seen.map((s) => s.headers[IDEMPOTENCY_HEADER])).size).toBe(1);
    expect(hook.stats()).toMatchObject({ delivered: 1, retries: 2, failed: 0 });
    const metrics = await registry.getMetricsAsJSON();
    expect(metrics.find((m) => m.name === 'nearcast_webhook_retries_total')!.values[0]!.value).toBe(2);
  });

  it('gives up on a slow receiver’s attempt after the timeout and succeeds once it answers in time', async () => {
    const r = await receiver((n) => ({ status: 200, delayMs: n === 1 ? 2_000 : 0 }));
    const hook = client(r.port);
    hook.enqueue(alerts(1)[0]!);
    await hook.idle();
    await stop(r.server);
    expect(r.seen.length).toBe(2);
    expect(hook.stats()).toMatchObject({ delivered: 1, retries: 1 });
  });

  it('keeps trying while the receiver is down and delivers once it comes up', async () => {
    const probe = await receiver(() => ({ status: 200 }));
    const port = probe.port;
    await stop(probe.server);
    const hook = client(port, { maxAttempts: 50 });
    hook.enqueue(alerts(1)[0]!);
    await new Promise((resolve) => setTimeout(resolve, 150));
    expect(hook.stats().delivered).toBe(0);
    const r = await receiver(() => ({ status: 200 }), port);
    await hook.idle();
    await stop(r.server);
    expect(hook.stats().delivered).toBe(1);
    expect(hook.stats().retries).toBeGreaterThan(0);
  });

  it('gives up after the last attempt on a receiver that stays down', async () => {
    const probe = await receiver(() => ({ status: 200 }));
    await stop(probe.server);
    const hook = client(probe.port, { maxAttempts: 3 });
    hook.enqueue(alerts(1)[0]!);
    await hook.idle();
    expect(hook.stats()).toMatchObject({ delivered: 0, failed: 1, retries: 2 });
  });

  it('does not retry a record the receiver rejects, and never follows a redirect', async () => {
    const r = await receiver((n) => (n === 1 ? { status: 400 } : { status: 302, headers: { location: 'https://127.0.0.1/elsewhere' } }));
    const hook = client(r.port);
    const [a, b] = alerts(2);
    hook.enqueue(a!);
    hook.enqueue(b!);
    await hook.idle();
    await stop(r.server);
    expect(r.seen.map((s) => s.url)).toEqual(['/hooks/alerts', '/hooks/alerts']);
    expect(hook.stats()).toMatchObject({ rejected: 1, failed: 1, delivered: 0, retries: 0 });
  });

  it('never blocks the pipeline: a full queue drops its oldest record, counts it and logs it without the secret', async () => {
    const probe = await receiver(() => ({ status: 200 }));
    await stop(probe.server);
    const lines: string[] = [];
    const logger = createLogger('warn', new Writable({ write: (chunk, _enc, cb) => (lines.push(String(chunk)), cb()) }));
    const hook = client(probe.port, { queueCapacity: 2, maxAttempts: 2, logger });
    const batch = alerts(6);
    // The first record goes in flight at once; the queue then holds two and drops the oldest of the rest.
    for (const a of batch) hook.enqueue(a);
    expect(hook.stats()).toMatchObject({ dropped: 3, queued: 3 });
    await hook.idle();
    expect(hook.stats()).toMatchObject({ dropped: 3, failed: 3 });
    const drops = lines.map((l) => JSON.parse(l)).filter((l) => l.msg.includes('dropped the oldest'));
    expect(drops.map((l) => l.alertId)).toEqual(batch.slice(1, 4).map((a) => a.alertId));
    expect(lines.join('\n')).not.toContain(SECRET);
  });

  it('stops at close: a record waiting for its retry is not sent again', async () => {
    const r = await receiver(() => ({ status: 503 }));
    const hook = client(r.port, { baseDelayMs: 5_000, maxDelayMs: 5_000, maxAttempts: 5 });
    hook.enqueue(alerts(1)[0]!);
    while (r.seen.length === 0) await new Promise((resolve) => setTimeout(resolve, 10));
    await new Promise((resolve) => setTimeout(resolve, 50));
    hook.close();
    await hook.idle();
    await new Promise((resolve) => setTimeout(resolve, 50));
    await stop(r.server);
    expect(r.seen).toHaveLength(1);
    expect(hook.stats()).toMatchObject({ failed: 1, delivered: 0 });
  });

  it('refuses loopback and private targets unless the host is the one explicitly allowed', async () => {
    const r = await receiver(() => ({ status: 200 }));
    const hook = new WebhookDelivery({ url: `https://127.0.0.1:${r.port}/`, secret: SECRET, ca: cert, maxAttempts: 1 });
    hook.enqueue(alerts(1)[0]!);
    await hook.idle();
    await stop(r.server);
    expect(r.seen).toHaveLength(0);
    expect(hook.stats()).toMatchObject({ refused: 1, delivered: 0 });
  });

  it('resolves the host name and refuses it if any address it resolves to is inside the network', async () => {
    const hook = new WebhookDelivery({
      url: 'https://alerts.example.org/hook',
      secret: SECRET,
      maxAttempts: 1,
      resolve: async () => [
        { address: '93.184.216.34', family: 4 },
        { address: '10.1.2.3', family: 4 },
      ],
    });
    hook.enqueue(alerts(1)[0]!);
    await hook.idle();
    expect(hook.stats().refused).toBe(1);
  });

  it('classifies address ranges: loopback, private, link-local, CGNAT, unique-local and mapped addresses are refused', () => {
    for (const a of ['127.0.0.1', '10.0.0.8', '172.20.1.1', '192.168.1.10', '169.254.169.254', '100.64.0.1', '0.0.0.0', '224.0.0.1', '::1', 'fd12::1', 'fe80::1', '::ffff:127.0.0.1', '::ffff:a00:1', 'not-an-ip']) {
      expect(isRefusedAddress(a), a).toBe(true);
    }
    for (const a of ['93.184.216.34', '8.8.8.8', '2606:4700:4700::1111']) expect(isRefusedAddress(a), a).toBe(false);
  });

  it('accepts only an https URL without credentials, and a secret of at least 16 characters', () => {
    expect(() => new WebhookDelivery({ url: 'http://alerts.example.org/', secret: SECRET })).toThrowError(expect.objectContaining({ code: 'NEARCAST_WEBHOOK_REFUSED' }));
    expect(() => new WebhookDelivery({ url: 'https://user:pw@alerts.example.org/', secret: SECRET })).toThrowError(/must not carry a user name or password/);
    expect(() => new WebhookDelivery({ url: 'https://alerts.example.org/', secret: 'short' })).toThrowError(expect.objectContaining({ code: 'NEARCAST_CONFIG_INVALID' }));
    try {
      new WebhookDelivery({ url: 'http://alerts.example.org/?token=abc123', secret: SECRET });
    } catch (err) {
      expect((err as Error).message).not.toContain('abc123');
    }
  });
});

describe('retry backoff', () => {
  it('waits a seeded random time under a ceiling that doubles per attempt up to the cap', () => {
    const a = new Backoff({ baseDelayMs: 100, maxDelayMs: 1_000 }, 42);
    const b = new Backoff({ baseDelayMs: 100, maxDelayMs: 1_000 }, 42);
    const waits = Array.from({ length: 8 }, (_, i) => a.delayMs(i + 1));
    expect(Array.from({ length: 8 }, (_, i) => b.delayMs(i + 1))).toEqual(waits);
    const ceilings = [100, 200, 400, 800, 1_000, 1_000, 1_000, 1_000];
    waits.forEach((w, i) => {
      expect(w).toBeGreaterThanOrEqual(0);
      expect(w).toBeLessThan(ceilings[i]!);
    });
    expect(new Backoff({ baseDelayMs: 100, maxDelayMs: 1_000 }, 43).delayMs(4)).not.toBe(waits[3]);
  });
});
