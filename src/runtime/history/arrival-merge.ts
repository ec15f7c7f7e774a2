// DESIGN section 3, arrival order in files: a history file lists records in the order they arrived. A record that
// stands after records with a later knowledge time is taken to have arrived at the latest knowledge time seen
// before it in its file (late data); otherwise it arrived when it became known. Files are then merged by that
// arrival time. Both steps are deterministic: ties go to the file listed first, then to the earlier line.

export interface Timed {
  readonly knowledgeMs: number;
}

export interface Arrived<T> {
  readonly item: T;
  readonly arrivalMs: number;
  /** Rank of the source file (lower first on equal arrival). */
  readonly rank: number;
  readonly line: number;
}

/** Applies the arrival rule to one file's records, in file order. */
export async function* withArrival<T extends Timed>(items: AsyncIterable<{ item: T; line: number }>, rank: number): AsyncGenerator<Arrived<T>> {
  let latest = Number.NEGATIVE_INFINITY;
  for await (const { item, line } of items) {
    const arrivalMs = Math.max(latest, item.knowledgeMs);
    latest = arrivalMs;
    yield { item, arrivalMs, rank, line };
  }
}

function before<T>(a: Arrived<T>, b: Arrived<T>): boolean {
  if (a.arrivalMs !== b.arrivalMs) return a.arrivalMs < b.arrivalMs;
  if (a.rank !== b.rank) return a.rank < b.rank;
  return a.line < b.line;
}

/**
 * Merges sources whose arrival times never decrease (the arrival rule guarantees it) into one stream ordered by
 * (arrival, rank, line). Streams: holds one head per source, so memory does not grow with the history.
 */
export async function* mergeByArrival<T>(sources: readonly AsyncIterable<Arrived<T>>[]): AsyncGenerator<Arrived<T>> {
  const iterators = sources.map((s) => s[Symbol.asyncIterator]());
  const heads: (Arrived<T> | undefined)[] = await Promise.all(iterators.map(async (it) => (await it.next()).value as Arrived<T> | undefined));
  for (;;) {
    let best = -1;
    for (let i = 0; i < heads.length; i++) {
      const h = heads[i];
      if (h !== undefined && (best < 0 || before(h, heads[best]!))) best = i;
    }
    if (best < 0) return;
    yield heads[best]!;
    const next = await iterators[best]!.next();
    heads[best] = next.done ? undefined : next.value;
  }
}
