import { randomUUID } from 'node:crypto';
import Fastify, { type FastifyInstance, type FastifyReply, type FastifyRequest } from 'fastify';
import type { Config } from '../../config/config.ts';
import type { RecordValidator } from '../../contracts/validate.ts';
import { ERRORS, type ErrorCode } from '../../errors.ts';
import { authenticate, hasScope, readableLocations, type Principal } from './bearer-auth.ts';
import type { EmbeddedRuntime } from './embedded-runtime.ts';
import { bodyRecords, HTTP_TYPES, ingestHttpBatch } from './http-ingest.ts';
import type { LiveClock } from './live-clock.ts';
import type { StoredOutput } from './embedded-store.ts';

// The small HTTP surface of embedded mode: health, readiness, ingestion, and the committed plans, manifests and
// alerts. Built apart from listening, so tests use inject(). Responses to errors are RFC 9457 problem details
// with our stable error code.

export interface HttpAppOptions {
  readonly runtime: EmbeddedRuntime;
  readonly validator: RecordValidator;
  readonly config: Pick<Config, 'http' | 'tokens'>;
  readonly clock?: LiveClock;
  /** Arrival time of an ingested record (the wall clock in `serve`). */
  readonly now: () => number;
}

function problem(reply: FastifyReply, code: ErrorCode, detail?: string) {
  const spec = ERRORS[code];
  return reply.code(spec.httpStatus).type('application/problem+json').send({ type: `urn:nearcast:error:${code}`, title: spec.message, status: spec.httpStatus, code, ...(detail ? { detail } : {}) });
}

const data = (rows: readonly StoredOutput[]) => rows.map((r) => JSON.parse(r.data) as unknown);

export function buildHttpApp(options: HttpAppOptions): FastifyInstance {
  const { runtime, validator, config } = options;
  const app = Fastify({ bodyLimit: config.http.bodyLimitBytes, logger: false });
  app.addContentTypeParser(['application/x-ndjson', 'text/plain'], { parseAs: 'string' }, (_req, body, done) => done(null, body));
  const open = config.tokens.length === 0;
  const who = (req: FastifyRequest): Principal | null =>
    open ? { name: 'local', scopes: ['admin'] } : authenticate(config.tokens, req.headers.authorization, options.now());

  app.get('/health', async () => ({ status: 'ok' }));
  app.get('/ready', async (_req, reply) => {
    const ready = runtime.caughtUp();
    return reply.code(ready ? 200 : 503).send({ ready });
  });

  app.post('/v1/ingest/:type', async (req, reply) => {
    const p = who(req);
    if (!p) return problem(reply, 'NEARCAST_API_UNAUTHORIZED');
    const { type } = req.params as { type: string };
    if (!(HTTP_TYPES as readonly string[]).includes(type)) return problem(reply, 'NEARCAST_INPUT_UNKNOWN_TYPE', `type must be one of ${HTTP_TYPES.join(', ')}`);
    if (!hasScope(p, type === 'alert-command' ? 'acknowledge' : 'ingest')) return problem(reply, 'NEARCAST_API_FORBIDDEN');
    const report = ingestHttpBatch(runtime, validator, options.clock, {
      type,
      texts: bodyRecords(req.body),
      requestId: randomUUID(),
      route: `/v1/ingest/${type}`,
      arrivalMs: options.now(),
    });
    return reply.code(report.accepted === 0 && report.rejected.length > 0 ? 400 : 200).send(report);
  });

  const listing = (topic: 'plans' | 'alerts', manifests: boolean) => async (req: FastifyRequest, reply: FastifyReply) => {
    const p = who(req);
    if (!p) return problem(reply, 'NEARCAST_API_UNAUTHORIZED');
    const q = req.query as { location?: string; item?: string; after?: string; limit?: string };
    const allowed = readableLocations(p);
    // Another location's data answers 404, so a token cannot even learn which locations exist.
    if (q.location && allowed !== '*' && !allowed.has(q.location)) return problem(reply, 'NEARCAST_API_NOT_FOUND');
    if (!q.location && allowed !== '*') return problem(reply, 'NEARCAST_API_FORBIDDEN', 'name a location you may read');
    const limit = Math.min(Number(q.limit ?? config.http.maxPageSize) || config.http.maxPageSize, config.http.maxPageSize);
    const prefix = q.location ? `${q.location}|${manifests ? '#manifest' : (q.item ?? '')}` : undefined;
    let rows = runtime.store.latest(topic, { ...(q.location ? { location: q.location } : {}), ...(prefix ? { keyPrefix: prefix } : {}), ...(q.after ? { afterKey: q.after } : {}), limit: limit + 1 });
    // Re-plan entries share the alerts topic (their own CloudEvents type); the alerts listing shows alerts only.
    rows = rows.filter((r) => r.key.endsWith('|#manifest') === manifests && !r.key.endsWith('|#replan'));
    const page = rows.slice(0, limit);
    return reply.send({ items: data(page), next: rows.length > limit ? page.at(-1)!.key : null });
  };
  app.get('/v1/plans', listing('plans', false));
  app.get('/v1/manifests', listing('plans', true));
  app.get('/v1/alerts', listing('alerts', false));
  return app;
}
