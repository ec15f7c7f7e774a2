import { describe, expect, it } from 'vitest';
import { applyBaselineVersion } from '../../../src/sensing/apply-baseline.ts';
import { applyOrderLine } from '../../../src/sensing/apply-order-line.ts';
import { applyShipment } from '../../../src/sensing/apply-shipment.ts';
import { decodeColumn, decodeTypedColumn, encodeColumn } from '../../../src/sensing/column-codec.ts';
import { createLocationState } from '../../../src/sensing/location-state.ts';
import { restoreLocationState, snapshotLocationState, type LocationStateSnapshot } from '../../../src/sensing/snapshot.ts';
import { baseline, line, MASTER, shipment } from './helpers/records.ts';

/** Version-2 baseline columns as the version-1 list of versions. */
function baselinesAsList(c: Record<string, string>): unknown[] {
  const col = (k: string) => decodeColumn(c[k]!)!;
  const counts = col('weekCount');
  const weeks = col('weeks');
  const quantities = col('quantities');
  let at = 0;
  return col('version').map((version, i) => {
    const n = counts[i]!;
    const entry = { version, eventHash: col('eventHash')[i], publishedMs: col('publishedMs')[i], knownMs: col('knownMs')[i], knownDay: col('knownDay')[i], weeks: weeks.slice(at, at + n), quantities: quantities.slice(at, at + n) };
    at += n;
    return entry;
  });
}

describe('the snapshot column form', () => {
  it('delta-codes integer columns as zigzag varints in base64', () => {
    // Deltas 1, 1, 1 → zigzag 2, 2, 2 → bytes 02 02 02 → base64 "AgIC".
    expect(encodeColumn([1, 2, 3])).toBe('dAgIC');
    // Delta −1 → zigzag 1; delta 64 → zigzag 128 → varint 80 01: bytes 01 80 01 → "AYAB".
    expect(encodeColumn([-1, 63])).toBe('dAYAB');
    expect(encodeColumn([])).toBe('d');
  });

  it('keeps fractional values as little-endian float64', () => {
    // 0.5 = 0x3FE0000000000000 → bytes 00 00 00 00 00 00 E0 3F → "AAAAAAAA4D8".
    expect(encodeColumn([0.5])).toBe('fAAAAAAAA4D8');
  });

  it('gives back every value bit for bit, −0 and 53-bit integers included', () => {
    const columns = [[0], [-0], [1, -0, 2], [2 ** 53 - 1, -(2 ** 53 - 1), 0], [0.1, 1e300, 5e-324, -2.5], [1_772_000_000_000, 1_772_000_003_600, 1_771_999_000_000]];
    for (const c of columns) {
      const back = decodeColumn(encodeColumn(c))!;
      expect(back.length).toBe(c.length);
      back.forEach((v, i) => expect(Object.is(v, c[i])).toBe(true));
    }
  });

  it('refuses damaged text', () => {
    expect(decodeColumn('x')).toBeUndefined();
    expect(decodeColumn('dA')).toBeUndefined(); // one base64 character cannot hold a byte
    expect(decodeColumn('d/w')).toBeUndefined(); // a varint whose last byte says "more follows"
    expect(decodeColumn('fAAAA')).toBeUndefined(); // not a whole float64
    expect(decodeColumn('d*AA')).toBeUndefined();
    // Characters outside the standard alphabet (URL-safe ones, padding, white space) are damage, not skipped.
    expect(decodeColumn('dAg-C')).toBeUndefined();
    expect(decodeColumn('dAg_C')).toBeUndefined();
    expect(decodeColumn('dAgIC=')).toBeUndefined();
    expect(decodeColumn('dAg IC')).toBeUndefined();
    expect(decodeTypedColumn('fAAAAAAAA4D_', 'f64')).toBeUndefined();
    // "Aw" is the byte 03 (zigzag 3 → −2) with four zero bits left over; "Ax" leaves a stray bit the encoder never writes.
    expect(decodeColumn('dAw')).toEqual([-2]);
    expect(decodeColumn('dAx')).toBeUndefined();
  });

  it('decodes what a standard base64 codec encodes (RFC 4648, padding dropped)', () => {
    // Bytes 02 02 02 are deltas 1, 1, 1 (see above); 00×6 E0 3F is 0.5 as little-endian float64.
    const b64 = (bytes: number[]) => Buffer.from(bytes).toString('base64').replace(/=+$/, '');
    expect(decodeColumn(`d${b64([2, 2, 2])}`)).toEqual([1, 2, 3]);
    expect(Array.from(decodeTypedColumn(`f${b64([0, 0, 0, 0, 0, 0, 0xe0, 0x3f, 0, 0, 0, 0, 0, 0, 0xf0, 0xbf])}`, 'f64')!)).toEqual([0.5, -1]);
  });

  it('decodes straight into a typed array the values the plain decoding gives', () => {
    const f64 = decodeTypedColumn(encodeColumn([1_772_000_000_000, 1_772_000_003_600, -5]), 'f64')!;
    expect(f64).toBeInstanceOf(Float64Array);
    expect([...f64]).toEqual([1_772_000_000_000, 1_772_000_003_600, -5]);
    const raw = decodeTypedColumn(encodeColumn([0.1, -2.5, 5e-324]), 'f64')!;
    expect([...raw]).toEqual([0.1, -2.5, 5e-324]);
    const i32 = decodeTypedColumn(encodeColumn([3, -1, 20_000, 7]), 'i32')!;
    expect(i32).toBeInstanceOf(Int32Array);
    expect([...i32]).toEqual([3, -1, 20_000, 7]);
    // A fractional value in an i32 column truncates, as Int32Array.from does (2.75 → 2, −1.5 → −1).
    expect([...decodeTypedColumn(encodeColumn([2.75, -1.5]), 'i32')!]).toEqual([2, -1]);
    expect(decodeTypedColumn('d', 'i32')!.length).toBe(0);
    expect(decodeTypedColumn('d/w', 'f64')).toBeUndefined();
    expect(decodeTypedColumn('fAAAA', 'f64')).toBeUndefined();
    expect(decodeTypedColumn(encodeColumn([1, Number.NaN]), 'f64')).toBeUndefined();
    expect(decodeTypedColumn(encodeColumn([Number.POSITIVE_INFINITY]), 'i32')).toBeUndefined();
  });

  it('restores a version-1 snapshot (plain number lists) to the same state', () => {
    const s = createLocationState(MASTER);
    applyOrderLine(s, line({ quantity: 7, customer: 'CAFE-ZED' }));
    applyOrderLine(s, line({ orderId: 'O-2', quantity: 5.5, customer: 'BAR-ALPHA' }));
    applyShipment(s, shipment({}));
    applyBaselineVersion(s, baseline({}));
    const v2 = JSON.parse(JSON.stringify(snapshotLocationState(s))) as LocationStateSnapshot;
    const plain = (cols: Record<string, string | number[]>) =>
      Object.fromEntries(Object.entries(cols).map(([k, v]) => [k, typeof v === 'string' ? decodeColumn(v) : v]));
    const v1 = {
      ...v2,
      schema: 'nearcast.sensing-state.v1',
      series: v2.series.map((x) => ({
        ...x,
        lines: plain(x.lines),
        shipments: plain(x.shipments),
        baselines: baselinesAsList(x.baselines as unknown as Record<string, string>),
      })),
    };
    expect(v1.series[0]!.lines.quantity).toEqual([7, 5.5]);
    expect(v1.series[0]!.baselines).toHaveLength(1);
    expect(snapshotLocationState(restoreLocationState(v1))).toEqual(v2);
  });
});
