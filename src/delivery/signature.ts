import { createHmac, timingSafeEqual } from 'node:crypto';

// Webhook bodies are signed with HMAC-SHA256 over "<timestamp>.<body>" (RFC 2104; the timestamp in the signed
// text lets a receiver refuse replays of an old body). Header values: X-Nearcast-Timestamp = Unix seconds,
// X-Nearcast-Signature = "v1=<hex>" (the version prefix leaves room to rotate the scheme).

export const TIMESTAMP_HEADER = 'x-nearcast-timestamp';
export const SIGNATURE_HEADER = 'x-nearcast-signature';
export const IDEMPOTENCY_HEADER = 'idempotency-key';

export function sign(secret: string, timestampSec: number, body: string): string {
  return `v1=${createHmac('sha256', secret).update(`${timestampSec}.${body}`).digest('hex')}`;
}

/** For receivers (and tests): constant-time comparison, and a bound on the timestamp's age. */
export function verifySignature(secret: string, timestampHeader: string | undefined, body: string, signatureHeader: string | undefined, nowSec: number, toleranceSec = 300): boolean {
  if (timestampHeader === undefined || signatureHeader === undefined || !/^\d{1,12}$/.test(timestampHeader)) return false;
  const ts = Number(timestampHeader);
  if (Math.abs(nowSec - ts) > toleranceSec) return false;
  const expected = Buffer.from(sign(secret, ts, body));
  const given = Buffer.from(signatureHeader);
  return expected.length === given.length && timingSafeEqual(expected, given);
}
