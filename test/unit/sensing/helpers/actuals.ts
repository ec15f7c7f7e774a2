import { DateTime } from 'luxon';
import type { OrderLine } from '../../../../src/contracts/order-line.ts';
import type { Scenario } from './scenario.ts';

/** Final ordered quantity per item and week start (highest revision of each line, by requested date). */
export function actualWeekly(scenario: Scenario): Map<string, Map<string, number>> {
  const lines = new Map<string, OrderLine>();
  for (const r of scenario.records) {
    if (r.kind !== 'order-line') continue;
    const key = `${r.record.item}|${r.record.orderId}|${r.record.lineId}`;
    const prev = lines.get(key);
    if (!prev || prev.revision < r.record.revision) lines.set(key, r.record);
  }
  const out = new Map<string, Map<string, number>>();
  for (const l of lines.values()) {
    const q = l.op === 'cancel' ? 0 : l.quantity ?? 0;
    const week = DateTime.fromISO(l.requestedDate, { zone: 'utc' }).startOf('week').toISODate()!;
    const m = out.get(l.item) ?? new Map<string, number>();
    m.set(week, (m.get(week) ?? 0) + q);
    out.set(l.item, m);
  }
  return out;
}
