import { describe, expect, it } from 'vitest';
import { loadConfig, redactedConfig } from '../../../src/config/config.ts';
import { isNearcastError } from '../../../src/errors.ts';

function startupError(env: Record<string, string>): string {
  try {
    loadConfig({ env });
  } catch (err) {
    if (isNearcastError(err, 'NEARCAST_CONFIG_INVALID')) return err.message;
    throw err;
  }
  throw new Error('expected a configuration error');
}

describe('configuration', () => {
  it('runs embedded on SQLite with documented defaults when nothing is set', () => {
    const c = loadConfig();
    expect(c.kafka.brokers).toBeUndefined();
    expect(c.embedded.database).toBe('nearcast.sqlite');
    expect(c.demandBasis).toBe('orders');
    expect(c.topics.plans).toBe('nearcast.plans.v1');
    expect(c.http.host).toBe('127.0.0.1');
    expect(Object.isFrozen(c.kafka)).toBe(true);
  });

  it('reads settings from the environment', () => {
    const c = loadConfig({ env: { NEARCAST_KAFKA_BROKERS: '127.0.0.1:9092,127.0.0.1:9093', NEARCAST_HTTP_PORT: '9000', NEARCAST_DEMAND_BASIS: 'shipments' } });
    expect(c.kafka.brokers).toBe('127.0.0.1:9092,127.0.0.1:9093');
    expect(c.http.port).toBe(9000);
    expect(c.demandBasis).toBe('shipments');
  });

  it('lists every bad setting in one start-up error, naming the variable', () => {
    const message = startupError({ NEARCAST_HTTP_PORT: '70000', NEARCAST_DEMAND_BASIS: 'invoices', NEARCAST_KAFKA_BROKERS: 'not a list' });
    expect(message).toContain('http.port (NEARCAST_HTTP_PORT)');
    expect(message).toContain('demandBasis (NEARCAST_DEMAND_BASIS)');
    expect(message).toContain('kafka.brokers (NEARCAST_KAFKA_BROKERS)');
  });

  it('never echoes a secret in a start-up error', () => {
    const message = startupError({ NEARCAST_WEBHOOK_SECRET: 'short-s3cr3t', NEARCAST_WEBHOOK_URL: 'http://example.invalid/hook' });
    expect(message).toContain('webhook.secret');
    expect(message).toContain('webhook.url');
    expect(message).not.toContain('short-s3cr3t');
  });

  it('redacts secrets from a printable copy', () => {
    const c = loadConfig({
      env: {
        NEARCAST_KAFKA_SASL_MECHANISM: 'scram-sha-512',
        NEARCAST_KAFKA_SASL_USERNAME: 'svc-nearcast',
        NEARCAST_KAFKA_SASL_PASSWORD: 'pa55word-very-secret',
        NEARCAST_WEBHOOK_SECRET: 'a-webhook-secret-of-32-characters',
      },
    });
    const printed = JSON.stringify(redactedConfig(c));
    expect(printed).not.toContain('pa55word-very-secret');
    expect(printed).not.toContain('a-webhook-secret-of-32-characters');
    expect(printed).toContain('svc-nearcast');
  });

  it('reports a missing configuration file clearly', () => {
    expect(() => loadConfig({ file: '/nonexistent/nearcast.json' })).toThrow(/does not exist/);
  });
});
