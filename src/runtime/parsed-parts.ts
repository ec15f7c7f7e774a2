// A location's saved parts as the changelog holds them (JSON text), parsed each time one is read. A restore of 100k
// series used to parse every part before rebuilding any series, so gigabytes of parsed objects were alive at once
// and garbage collection took most of the restore; read one by one, each parsed part is garbage once its series is
// rebuilt.

export class ParsedParts implements ReadonlyMap<string, unknown> {
  constructor(
    private readonly texts: ReadonlyMap<string, string>,
    /** Parses one part's text; throws a planner-readable error naming the entry when it is not JSON. */
    private readonly parse: (text: string, key: string) => unknown,
  ) {}

  get size(): number {
    return this.texts.size;
  }

  has(key: string): boolean {
    return this.texts.has(key);
  }

  get(key: string): unknown {
    const text = this.texts.get(key);
    return text === undefined ? undefined : this.parse(text, key);
  }

  keys(): MapIterator<string> {
    return this.texts.keys();
  }

  *entries(): MapIterator<[string, unknown]> {
    for (const [key, text] of this.texts) yield [key, this.parse(text, key)];
  }

  *values(): MapIterator<unknown> {
    for (const [key, text] of this.texts) yield this.parse(text, key);
  }

  forEach(callback: (value: unknown, key: string, map: ReadonlyMap<string, unknown>) => void): void {
    for (const [key, value] of this.entries()) callback(value, key, this);
  }

  [Symbol.iterator](): MapIterator<[string, unknown]> {
    return this.entries();
  }
}
