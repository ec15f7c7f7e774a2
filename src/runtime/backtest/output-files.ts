import { closeSync, openSync, writeFileSync, writeSync } from 'node:fs';

/**
 * An NDJSON file written line by line, buffered, synchronously (ordering and bytes are exactly as written). Lines
 * are encoded straight into one reused byte buffer: joining them into a text first cost as much as writing them
 * (a backtest of 100k series writes tens of gigabytes of plans).
 */
export class NdjsonFile {
  private readonly fd: number;
  private readonly bytes = Buffer.allocUnsafe(1 << 20);
  private used = 0;

  constructor(file: string) {
    this.fd = openSync(file, 'w');
  }

  write(line: string): void {
    // A UTF-16 code unit takes at most 3 bytes in UTF-8 (a surrogate pair, two units, takes 4).
    const most = 3 * line.length + 1;
    if (this.used + most > this.bytes.length) this.flush();
    if (most > this.bytes.length) {
      writeSync(this.fd, `${line}\n`);
      return;
    }
    this.used += this.bytes.write(line, this.used, 'utf8');
    this.bytes[this.used++] = 10;
  }

  flush(): void {
    let at = 0;
    while (at < this.used) at += writeSync(this.fd, this.bytes, at, this.used - at);
    this.used = 0;
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
