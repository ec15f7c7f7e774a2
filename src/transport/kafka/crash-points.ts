// Test hook for crash-safety tests: NEARCAST_CRASH_AT=<point>:<n>[,<point>:<n>...] makes the process SIGKILL
// itself the n-th time it passes <point>, exactly as a machine failure would (no exit handlers, no flush).
// Unset, every check is a map lookup that finds nothing.

export const CRASH_POINTS = [
  'after-produce', // offsets, outputs and changelog sent inside the open transaction, commit not yet asked
  'after-offsets', // consumed offsets added to the transaction, outputs not yet sent
  'during-commit', // commit (EndTxn) sent, its answer not yet received
  'after-commit', // committed, overlay not yet merged
  'after-barrier', // restore: barrier committed, changelog not yet read
  'during-restore', // restore: part of the changelog read
] as const;
export type CrashPoint = (typeof CRASH_POINTS)[number];

export interface CrashPoints {
  /** Counts a pass through `point`; kills the process when it is the configured pass. */
  pass(point: CrashPoint): void;
  /** Like pass, but the kill comes `delayMs` later, so a request sent meanwhile reaches the broker. */
  passSoon(point: CrashPoint, delayMs: number): void;
}

export function parseCrashSpec(spec: string | undefined): Map<CrashPoint, number> {
  const plan = new Map<CrashPoint, number>();
  if (!spec) return plan;
  for (const part of spec.split(',').map((p) => p.trim()).filter(Boolean)) {
    const [name, count] = part.split(':');
    if (!(CRASH_POINTS as readonly string[]).includes(name ?? '')) {
      throw new TypeError(`NEARCAST_CRASH_AT: unknown crash point ${JSON.stringify(name)}; known: ${CRASH_POINTS.join(', ')}`);
    }
    const n = count === undefined ? 1 : Number(count);
    if (!Number.isInteger(n) || n < 1) throw new TypeError(`NEARCAST_CRASH_AT: ${part} needs a pass number of at least 1`);
    plan.set(name as CrashPoint, n);
  }
  return plan;
}

export function createCrashPoints(spec: string | undefined, kill: () => void = () => process.kill(process.pid, 'SIGKILL')): CrashPoints {
  const plan = parseCrashSpec(spec);
  const passes = new Map<CrashPoint, number>();
  const due = (point: CrashPoint): boolean => {
    const target = plan.get(point);
    if (target === undefined) return false;
    const n = (passes.get(point) ?? 0) + 1;
    passes.set(point, n);
    return n === target;
  };
  return {
    pass(point) {
      if (due(point)) kill();
    },
    passSoon(point, delayMs) {
      if (due(point)) setTimeout(kill, delayMs);
    },
  };
}

export const NO_CRASH_POINTS: CrashPoints = { pass: () => undefined, passSoon: () => undefined };
