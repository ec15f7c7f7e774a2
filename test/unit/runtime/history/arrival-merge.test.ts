import { describe, expect, it } from 'vitest';
import { mergeByArrival, withArrival } from '../../../../src/runtime/history/arrival-merge.ts';

async function* items(...known: number[]) {
  let line = 0;
  for (const k of known) yield { item: { knowledgeMs: k, name: `${k}` }, line: ++line };
}

async function collect<T>(it: AsyncIterable<T>): Promise<T[]> {
  const out: T[] = [];
  for await (const x of it) out.push(x);
  return out;
}

describe('the arrival rule (DESIGN section 3)', () => {
  it('takes a record standing after later-known records to have arrived at the latest knowledge time before it', async () => {
    // Worked by hand: 10, 20, then 15 (late: arrives at 20), 30, then 5 (late: arrives at 30).
    const arrived = await collect(withArrival(items(10, 20, 15, 30, 5), 0));
    expect(arrived.map((a) => [a.item.knowledgeMs, a.arrivalMs])).toEqual([[10, 10], [20, 20], [15, 20], [30, 30], [5, 30]]);
  });

  it('merges files by arrival, ties going to the file listed first, then to the earlier line', async () => {
    const a = withArrival(items(10, 20, 20), 0);
    const b = withArrival(items(5, 20, 25), 1);
    const merged = await collect(mergeByArrival([a, b]));
    expect(merged.map((m) => `${m.rank}:${m.line}@${m.arrivalMs}`)).toEqual(['1:1@5', '0:1@10', '0:2@20', '0:3@20', '1:2@20', '1:3@25']);
  });
});
