import { createHash, timingSafeEqual } from 'node:crypto';
import type { Config } from '../../config/config.ts';

// Bearer tokens for the embedded routes: configured as SHA-256 hashes with scopes (read:<location> | read:* |
// ingest | acknowledge | admin) and an optional expiry. A presented token is hashed and compared with every
// configured hash in constant time, so timing reveals neither which token nor how much of it matched.

export interface Principal {
  readonly name: string;
  readonly scopes: readonly string[];
}

export type TokenTable = Config['tokens'];

export function authenticate(tokens: TokenTable, authorization: string | undefined, nowMs: number): Principal | null {
  const m = /^Bearer\s+(\S+)$/i.exec(authorization ?? '');
  if (!m) return null;
  const presented = createHash('sha256').update(m[1]!).digest();
  let found: Principal | null = null;
  for (const t of tokens) {
    const same = timingSafeEqual(presented, Buffer.from(t.sha256, 'hex'));
    const live = t.expiresAt === undefined || Date.parse(t.expiresAt) > nowMs;
    if (same && live && found === null) found = { name: t.name, scopes: t.scopes };
  }
  return found;
}

export function hasScope(p: Principal, scope: 'ingest' | 'acknowledge' | 'admin'): boolean {
  return p.scopes.includes(scope) || p.scopes.includes('admin');
}

/** Locations the principal may read: '*' for all. */
export function readableLocations(p: Principal): '*' | Set<string> {
  if (p.scopes.includes('admin') || p.scopes.includes('read:*')) return '*';
  return new Set(p.scopes.filter((s) => s.startsWith('read:')).map((s) => s.slice(5)));
}
