import type { LocationState } from './location-state.ts';

// Which kept as-of signals a newly applied record can change. A record known on day K changes what every as-of
// day ≥ K saw, so a record is "late" for kept signals when K is on or before the newest day kept. Only those are
// logged (by their apply index), which keeps the log as small as the late data itself.

interface Log {
  applied: number;
  /** Newest as-of day with kept signals. */
  keptThrough: number;
  /** [apply index, knowledge day] of each late record. */
  late: Array<readonly [number, number]>;
}

const logs = new WeakMap<LocationState, Log>();

/** Called by every apply function that stored a record known on `knownDay`. */
export function noteKnown(state: LocationState, knownDay: number): void {
  const log = logs.get(state);
  if (!log) return;
  log.applied++;
  if (knownDay <= log.keptThrough) log.late.push([log.applied, knownDay]);
}

/** The current apply index, to stamp signals about to be kept for as-of `day`. */
export function knowledgeStamp(state: LocationState, day: number): number {
  let log = logs.get(state);
  if (!log) {
    log = { applied: 0, keptThrough: -Infinity, late: [] };
    logs.set(state, log);
  }
  if (day > log.keptThrough) log.keptThrough = day;
  return log.applied;
}

/** Whether a record applied after `stamp` was known on or before `day`. */
export function knownSince(state: LocationState, stamp: number, day: number): boolean {
  const log = logs.get(state);
  if (!log) return true;
  for (let k = log.late.length - 1; k >= 0; k--) {
    const [at, known] = log.late[k]!;
    if (at <= stamp) break;
    if (known <= day) return true;
  }
  return false;
}

/** Drops log entries no kept signal can be older than. */
export function trimKnowledgeLog(state: LocationState, oldestStamp: number): void {
  const log = logs.get(state);
  if (!log) return;
  let k = 0;
  while (k < log.late.length && log.late[k]![0] <= oldestStamp) k++;
  if (k > 0) log.late.splice(0, k);
}
