import { describe, expect, it } from 'vitest';
import { createCrashPoints, parseCrashSpec } from '../../../../src/transport/kafka/crash-points.ts';

describe('the crash-point hook', () => {
  it('kills on the configured pass of the named point only', () => {
    let kills = 0;
    const crash = createCrashPoints('after-produce:3,during-restore', () => kills++);
    crash.pass('after-offsets');
    crash.pass('after-produce');
    crash.pass('after-produce');
    expect(kills).toBe(0);
    crash.pass('after-produce');
    expect(kills).toBe(1);
    crash.pass('after-produce');
    expect(kills).toBe(1);
    crash.pass('during-restore');
    expect(kills).toBe(2);
  });

  it('does nothing when unset', () => {
    let kills = 0;
    const crash = createCrashPoints(undefined, () => kills++);
    for (let i = 0; i < 10; i++) crash.pass('after-commit');
    expect(kills).toBe(0);
  });

  it('refuses an unknown point or a bad pass number, naming the variable', () => {
    expect(() => parseCrashSpec('after-lunch:1')).toThrow(/NEARCAST_CRASH_AT: unknown crash point "after-lunch"/);
    expect(() => parseCrashSpec('after-commit:0')).toThrow(/NEARCAST_CRASH_AT: after-commit:0 needs a pass number of at least 1/);
  });
});
