import { Writable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { createLogger } from '../../src/log.ts';

describe('the logger', () => {
  it('redacts secret fields wherever they appear', () => {
    const lines: string[] = [];
    const sink = new Writable({
      write(chunk, _enc, done) {
        lines.push(String(chunk));
        done();
      },
    });
    const log = createLogger('info', sink);
    log.info({ kafka: { sasl: { password: 'p4ss' } }, webhook: { secret: 's3cret' }, req: { headers: { authorization: 'Bearer t0ken' } } }, 'starting');
    const text = lines.join('');
    expect(text).toContain('starting');
    for (const secret of ['p4ss', 's3cret', 't0ken']) expect(text).not.toContain(secret);
  });
});
