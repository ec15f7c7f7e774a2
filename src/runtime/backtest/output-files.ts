import { closeSync, openSync, writeFileSync, writeSync } from 'node:fs';

/** An NDJSON file written line by line, buffered, synchronously (ordering and bytes are exactly as written). */
export class NdjsonFile {
  private readonly fd: number;
  private buffer: string[] = [];
  private size = 0;

  constructor(file: string) {
    this.fd = openSync(file, 'w');
  }

  write(line: string): void {
    this.buffer.push(line);
    this.size += line.length + 1;
    if (this.size > 1_048_576) this.flush();
  }

  flush(): void {
    if (this.buffer.length === 0) return;
    writeSync(this.fd, `${this.buffer.join('\n')}\n`);
    this.buffer = [];
    this.size = 0;
  }

  close(): void {
    this.flush();
    closeSync(this.fd);
  }
}

/** Rounds to 6 decimals so reports read well and stay byte-stable; integers are unchanged. */
function round(_key: string, value: unknown): unknown {
  return typeof value === 'number' && !Number.isInteger(value) ? Math.round(value * 1e6) / 1e6 : value;
}

export function writeJsonFile(file: string, value: unknown): void {
  writeFileSync(file, `${JSON.stringify(value, round, 2)}\n`);
}
