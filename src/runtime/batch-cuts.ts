import type { LogEntry } from './event-log-record.ts';

/** Record kinds that close a location's day by themselves (a source's close, the live clock's deadline). */
const CLOSING: ReadonlySet<string> = new Set(['day-closed', 'deadline-close']);

/**
 * A batch of the event log cut after each record that closes a day. The transports commit each piece on its own,
 * so a close's plans and manifest are committed without the records fetched behind it, and the work those records
 * start (their own state changes, the weekly prune a close leaves due) goes into the next piece's transaction.
 * The pieces hold every entry once, in order; an empty batch gives no piece.
 */
export function cutAfterCloses<T extends { readonly record: Pick<LogEntry['record'], 'kind'> }>(entries: readonly T[]): T[][] {
  const pieces: T[][] = [];
  let piece: T[] = [];
  for (const e of entries) {
    piece.push(e);
    if (CLOSING.has(e.record.kind)) {
      pieces.push(piece);
      piece = [];
    }
  }
  if (piece.length > 0) pieces.push(piece);
  return pieces;
}
