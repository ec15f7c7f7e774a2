import { describe, expect, it } from 'vitest';
import { newClusterId } from '../../../scripts/kafka-local/broker-lifecycle.ts';

// The storage tool refused a cluster id starting with '-' (it read it as an option), failing one fresh broker start
// in 64. Base64url (RFC 4648 §5) maps the 6-bit value 62 to '-': a first byte of 0xF8 (111110 00) starts with it.

describe('a new local broker cluster id', () => {
  it('draws again when the id would start with "-"', () => {
    const draws = [Buffer.alloc(16, 0xf8), Buffer.alloc(16, 0x00)];
    expect(Buffer.alloc(16, 0xf8).toString('base64url').startsWith('-')).toBe(true);
    expect(newClusterId(() => draws.shift()!)).toBe('AAAAAAAAAAAAAAAAAAAAAA');
    expect(draws).toHaveLength(0);
  });

  it('is 22 base64url characters never starting with "-"', () => {
    for (let i = 0; i < 2000; i++) expect(newClusterId()).toMatch(/^[A-Za-z0-9_][A-Za-z0-9_-]{21}$/);
  });
});
