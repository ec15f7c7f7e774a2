import { describe, expect, it } from 'vitest';
import { ERRORS, NearcastError, type ErrorCode } from '../../src/errors.ts';

describe('the error registry', () => {
  const codes = Object.keys(ERRORS) as ErrorCode[];

  it('uses stable NEARCAST_<AREA>_<WHAT> codes', () => {
    for (const code of codes) expect(code).toMatch(/^NEARCAST_[A-Z]+_[A-Z_]+$/);
  });

  it('gives every code a planner-readable message and an HTTP status', () => {
    for (const code of codes) {
      expect(ERRORS[code].message.length).toBeGreaterThan(10);
      expect(ERRORS[code].httpStatus).toBeGreaterThanOrEqual(400);
      expect(ERRORS[code].httpStatus).toBeLessThan(600);
    }
  });

  it('builds errors that carry code, retriability and details', () => {
    const err = new NearcastError('NEARCAST_INPUT_UNKNOWN_LOCATION', ['location: DC-ATLANTIS is not in the master data']);
    expect(err.code).toBe('NEARCAST_INPUT_UNKNOWN_LOCATION');
    expect(err.retriable).toBe(true);
    expect(err.httpStatus).toBe(422);
    expect(err.message).toBe('The record names a location that the master data does not know: location: DC-ATLANTIS is not in the master data');
  });
});
