import { describe, expect, it } from 'vitest';
import { crashRun } from './helpers/crash-run.ts';

// SIGKILL at each named point of the transaction and of the restore. The expected plans are an in-memory
// application of the same event log by a fresh stage (independent of Kafka); 4 days × 3 centres = 12 closes.

describe('a sensing process killed at a named point', () => {
  it.each([
    ['after producing outputs', 'after-produce:3', false],
    ['after adding the offsets', 'after-offsets:3', false],
    ['during the commit', 'during-commit:3', false],
    ['after the commit, before merging the overlay', 'after-commit:2', false],
    ['after writing the restore barrier', 'after-barrier:2', true],
    ['during the restore', 'during-restore:1', true],
  ] as const)('%s leaves the plans exactly as an uninterrupted run', async (_name, crashAt, restoreFirst) => {
    const run = await crashRun({ label: crashAt.replace(/:.*/, ''), crashAt, restoreFirst });
    expect(run.crashSignal).toBe('SIGKILL');
    expect(run.manifests).toBe(12);
    expect(run.actual).toEqual(run.expected);
  });
});
