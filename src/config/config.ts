import { readFileSync } from 'node:fs';
import { z } from 'zod';
import { DEFAULT_INPUT_LIMITS } from '../contracts/primitives.ts';
import { NearcastError } from '../errors.ts';
import { topicsSchema } from './topics.ts';

// Every setting, its default and its unit in one place. Validated once at start into a frozen object.

const port = z.coerce.number().int().min(0).max(65_535);
const bool = z.union([z.boolean(), z.enum(['true', 'false', '1', '0']).transform((v) => v === 'true' || v === '1')]);

export const configSchema = z.object({
  demandBasis: z.enum(['orders', 'shipments']).default('orders'),
  log: z.object({ level: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info') }).default({ level: 'info' }),
  kafka: z
    .object({
      /** Comma-separated host:port list; when absent nearcast runs embedded on SQLite. */
      brokers: z
        .string()
        .regex(/^[A-Za-z0-9.-]+:\d{1,5}(,[A-Za-z0-9.-]+:\d{1,5})*$/, { error: 'must be a comma-separated list of host:port' })
        .optional(),
      clientId: z.string().min(1).max(100).default('nearcast'),
      groupId: z.string().min(1).max(200).default('nearcast-sensing'),
      ssl: bool.default(false),
      sasl: z
        .object({
          mechanism: z.enum(['plain', 'scram-sha-256', 'scram-sha-512']),
          username: z.string().min(1),
          password: z.string().min(1),
        })
        .optional(),
      sessionTimeoutMs: z.coerce.number().int().min(6_000).max(300_000).default(10_000), // short: a dead member's partitions move quickly
      partitions: z.coerce.number().int().min(1).max(1_000).default(6),
      replicationFactor: z.coerce.number().int().min(1).max(7).default(1),
      maxMessageBytes: z.coerce.number().int().min(10_000).default(900_000), // below the broker default of 1 MiB
    })
    .default({ clientId: 'nearcast', groupId: 'nearcast-sensing', ssl: false, sessionTimeoutMs: 10_000, partitions: 6, replicationFactor: 1, maxMessageBytes: 900_000 }),
  topics: topicsSchema,
  embedded: z.object({ database: z.string().min(1).default('nearcast.sqlite') }).default({ database: 'nearcast.sqlite' }),
  http: z
    .object({
      host: z.string().min(1).default('127.0.0.1'),
      port: port.default(8080),
      bodyLimitBytes: z.coerce.number().int().min(1_024).max(64 * 1_048_576).default(1_048_576), // 1 MiB
      maxPageSize: z.coerce.number().int().min(1).max(10_000).default(500),
    })
    .default({ host: '127.0.0.1', port: 8080, bodyLimitBytes: 1_048_576, maxPageSize: 500 }),
  limits: z
    .object({
      maxQuantity: z.coerce.number().positive().default(DEFAULT_INPUT_LIMITS.maxQuantity),
      earliestTimestamp: z.string().default(DEFAULT_INPUT_LIMITS.earliestTimestamp),
      latestTimestamp: z.string().default(DEFAULT_INPUT_LIMITS.latestTimestamp),
      maxRequestedSpanDays: z.coerce.number().int().positive().default(DEFAULT_INPUT_LIMITS.maxRequestedSpanDays),
      maxBaselineWeeks: z.coerce.number().int().positive().default(DEFAULT_INPUT_LIMITS.maxBaselineWeeks),
    })
    .default({ ...DEFAULT_INPUT_LIMITS }),
  webhook: z
    .object({
      url: z.url({ protocol: /^https$/, error: 'must be an https URL' }).optional(),
      secret: z.string().min(16, { error: 'must be at least 16 characters' }).optional(),
      /** Test receivers only: a private address that is explicitly allowed. */
      allowPrivateHost: z.string().optional(),
    })
    .default({}),
  tokens: z
    .array(
      z.object({
        name: z.string().min(1).max(100),
        /** SHA-256 of the token, hex; the token itself is never stored. */
        sha256: z.string().regex(/^[0-9a-f]{64}$/, { error: 'must be a SHA-256 hex digest' }),
        scopes: z.array(z.string().regex(/^(read:[A-Za-z0-9._:*-]+|acknowledge|ingest|admin)$/)).min(1),
        expiresAt: z.string().optional(),
      }),
    )
    .default([]),
});

export type Config = Readonly<z.infer<typeof configSchema>>;

/** Paths whose values are secrets: never printed, never logged. */
export const SECRET_PATHS = ['kafka.sasl.password', 'webhook.secret', 'tokens'] as const;

// Environment variable → setting path. Values from the environment override the file.
export const ENV_MAP: Record<string, string> = {
  NEARCAST_DEMAND_BASIS: 'demandBasis',
  NEARCAST_LOG_LEVEL: 'log.level',
  NEARCAST_KAFKA_BROKERS: 'kafka.brokers',
  NEARCAST_KAFKA_CLIENT_ID: 'kafka.clientId',
  NEARCAST_KAFKA_GROUP_ID: 'kafka.groupId',
  NEARCAST_KAFKA_SSL: 'kafka.ssl',
  NEARCAST_KAFKA_SASL_MECHANISM: 'kafka.sasl.mechanism',
  NEARCAST_KAFKA_SASL_USERNAME: 'kafka.sasl.username',
  NEARCAST_KAFKA_SASL_PASSWORD: 'kafka.sasl.password',
  NEARCAST_KAFKA_PARTITIONS: 'kafka.partitions',
  NEARCAST_DB: 'embedded.database',
  NEARCAST_HTTP_HOST: 'http.host',
  NEARCAST_HTTP_PORT: 'http.port',
  NEARCAST_MAX_QUANTITY: 'limits.maxQuantity',
  NEARCAST_WEBHOOK_URL: 'webhook.url',
  NEARCAST_WEBHOOK_SECRET: 'webhook.secret',
};

function setPath(target: Record<string, unknown>, path: string, value: unknown): void {
  const parts = path.split('.');
  let node = target;
  for (const p of parts.slice(0, -1)) {
    if (typeof node[p] !== 'object' || node[p] === null) node[p] = {};
    node = node[p] as Record<string, unknown>;
  }
  node[parts.at(-1)!] = value;
}

function deepFreeze<T>(value: T): T {
  if (value && typeof value === 'object') {
    for (const v of Object.values(value)) deepFreeze(v);
    Object.freeze(value);
  }
  return value;
}

export interface ConfigSources {
  readonly env?: Record<string, string | undefined>;
  /** Path of an optional JSON configuration file (NEARCAST_CONFIG_FILE). */
  readonly file?: string;
  /** Settings given in code (tests, the demo); lowest precedence after defaults. */
  readonly overrides?: Record<string, unknown>;
}

export function loadConfig(sources: ConfigSources = {}): Config {
  const env = sources.env ?? {};
  const raw: Record<string, unknown> = structuredClone(sources.overrides ?? {});
  const problems: string[] = [];
  const file = sources.file ?? env.NEARCAST_CONFIG_FILE;
  if (file) {
    try {
      Object.assign(raw, JSON.parse(readFileSync(file, 'utf8')) as Record<string, unknown>);
    } catch (err) {
      problems.push(`configuration file ${file}: ${(err as NodeJS.ErrnoException).code === 'ENOENT' ? 'does not exist' : 'is not valid JSON'}`);
    }
  }
  for (const [name, path] of Object.entries(ENV_MAP)) {
    const v = env[name];
    if (v !== undefined && v !== '') setPath(raw, path, v);
  }
  const parsed = configSchema.safeParse(raw);
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const path = issue.path.map(String).join('.');
      const envName = Object.entries(ENV_MAP).find(([, p]) => p === path)?.[0];
      // The message is zod's or ours, never the offending value: a bad password must not reach the terminal.
      problems.push(`${path}${envName ? ` (${envName})` : ''}: ${issue.message}`);
    }
  }
  if (problems.length > 0) throw new NearcastError('NEARCAST_CONFIG_INVALID', problems);
  return deepFreeze(parsed.data!);
}

/** A copy safe to print or log: every secret replaced by a marker. */
export function redactedConfig(config: Config): unknown {
  const copy = structuredClone(config) as Record<string, unknown>;
  for (const path of SECRET_PATHS) {
    const parts = path.split('.');
    let node: Record<string, unknown> | undefined = copy;
    for (const p of parts.slice(0, -1)) node = node?.[p] as Record<string, unknown> | undefined;
    const last = parts.at(-1)!;
    if (node && node[last] !== undefined) node[last] = '[redacted]';
  }
  return copy;
}
