import { describe, expect, it } from 'vitest';
import { cutAfterCloses } from '../../../src/runtime/batch-cuts.ts';
import type { LogEntry } from '../../../src/runtime/event-log-record.ts';

const e = (offset: number, kind: LogEntry['record']['kind']) => ({ offset: String(offset), record: { kind } });

describe('a batch cut after each record that closes a day', () => {
  it('ends a piece at every day-closed and deadline-close record and keeps every entry once, in order', () => {
    const batch = [e(0, 'order-line'), e(1, 'day-closed'), e(2, 'shipment'), e(3, 'feed-health-check'), e(4, 'deadline-close'), e(5, 'deadline-close'), e(6, 'order-line')];
    const pieces = cutAfterCloses(batch);
    expect(pieces.map((p) => p.map((x) => x.offset))).toEqual([['0', '1'], ['2', '3', '4'], ['5'], ['6']]);
    expect(pieces.flat()).toEqual(batch);
  });

  it('gives one piece for a batch without a close and none for an empty batch', () => {
    expect(cutAfterCloses([e(7, 'order-line'), e(8, 'baseline-version')])).toHaveLength(1);
    expect(cutAfterCloses([])).toEqual([]);
  });
});
