import { createReadStream } from 'node:fs';
import { createInterface } from 'node:readline';

export interface NumberedLine {
  /** 1-based line number in the file, as an editor shows it. */
  readonly line: number;
  readonly text: string;
}

/** Lines of a text file, streamed; CRLF and LF both end a line, a leading UTF-8 byte-order mark is dropped. */
export async function* readLines(file: string): AsyncGenerator<NumberedLine> {
  const rl = createInterface({ input: createReadStream(file, { encoding: 'utf8' }), crlfDelay: Infinity });
  let n = 0;
  for await (const raw of rl) {
    n += 1;
    let text = n === 1 && raw.charCodeAt(0) === 0xfeff ? raw.slice(1) : raw;
    // readline keeps a lone trailing CR when a file mixes line ends; a record never ends in one.
    if (text.endsWith('\r')) text = text.slice(0, -1);
    yield { line: n, text };
  }
}
