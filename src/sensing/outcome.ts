import type { ErrorCode } from '../errors.ts';

/** What applying one input record to a location state did. */
export type ApplyOutcome =
  | { readonly status: 'applied' }
  /** Already known (same event id or same natural key): nothing changed. */
  | { readonly status: 'duplicate' }
  /** Kept for the as-known history, but a higher revision or version already decides the current state. */
  | { readonly status: 'superseded' }
  | { readonly status: 'rejected'; readonly code: ErrorCode; readonly path: string; readonly message: string };

export const APPLIED: ApplyOutcome = Object.freeze({ status: 'applied' });
export const DUPLICATE: ApplyOutcome = Object.freeze({ status: 'duplicate' });
export const SUPERSEDED: ApplyOutcome = Object.freeze({ status: 'superseded' });

export function rejected(code: ErrorCode, path: string, message: string): ApplyOutcome {
  return Object.freeze({ status: 'rejected', code, path, message });
}
