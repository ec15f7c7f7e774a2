import { PLAN_SCHEMA_VERSION, type Plan } from '../../../../src/contracts/plan.ts';
import { deadLetter } from '../../../../src/runtime/dead-letter.ts';
import type { EventLogRecord, LogEntry } from '../../../../src/runtime/event-log-record.ts';
import { buildManifest, deadLetterOutput, manifestOutput, planOutput } from '../../../../src/runtime/output-records.ts';
import type { SensingStage } from '../../../../src/runtime/sensing-stage-port.ts';
import { PARTITION_STATE_KEY, type BatchResult, type ChangelogEntry, type OutputRecord } from '../../../../src/runtime/stage-output.ts';

// A deliberately simple SensingStage for testing the Kafka machinery on its own: it sums the quantity of every
// order line it is given, WITHOUT de-duplicating by natural key, so a record applied twice (or lost) shows up in
// the published totals. On each day-closed record it publishes one plan per item (lead 0 adjusted = running sum)
// and the location manifest. `padBytes` inflates every snapshot so changelog values must be split in parts.

interface Tally {
  items: Record<string, { quantity: number; lines: number }>;
  closes: Record<string, number>;
  pad?: string;
}

export interface TallyOptions {
  readonly padBytes?: number;
}

const SOURCE = '/nearcast/test-tally';

export function tallyPlan(location: string, item: string, planDate: string, revision: number, quantity: number, lines: number): Plan {
  return {
    schemaVersion: PLAN_SCHEMA_VERSION,
    location: location as Plan['location'],
    item: item as Plan['item'],
    planDate,
    revision,
    basis: 'orders',
    leads: [
      {
        lead: 0,
        weekStart: planDate,
        baseline: null,
        adjusted: quantity,
        quantiles: { p50: quantity },
        cumulativeQuantiles: { p50: quantity },
        actualToDate: quantity,
        explanation: {
          method: 'run-rate',
          baselineVersion: null,
          orderBook: quantity,
          largeLines: 0,
          survivalRate: 1,
          survivingOrderBook: quantity,
          typicalBookShare: null,
          coverage: null,
          recentRatio: null,
          locationFactor: 1,
          seriesFactor: 1,
          seriesEvidenceWeight: 0,
          predictedRatio: 1,
          appliedRatio: 1,
          bounds: null,
          terms: [],
          coefficients: [],
          fit: { rows: lines, series: 1, weightedR2: null, halfLifeWeeks: 1 },
          volumeBand: 'test',
          dispersion: 0,
          guardrail: null,
          fallback: 'no-baseline',
          notes: [],
        },
      },
    ],
    moved: false,
    largestMove: 0,
  };
}

export function createTallyStage(partition: number, options: TallyOptions = {}): SensingStage {
  let committed = new Map<string, string>();
  let offset = 0n;
  let open: { offset: bigint; touched: Map<string, Tally> } | null = null;

  const read = (location: string): Tally | undefined => {
    const own = open?.touched.get(location);
    if (own) return own;
    const text = committed.get(location);
    return text === undefined ? undefined : (JSON.parse(text) as Tally);
  };

  const applyOne = (record: EventLogRecord, outputs: OutputRecord[]): void => {
    let tally = read(record.location);
    if (!tally) {
      if (record.kind !== 'location') {
        outputs.push(
          deadLetterOutput(
            SOURCE,
            deadLetter({
              type: record.kind,
              code: 'NEARCAST_INPUT_UNKNOWN_LOCATION',
              issues: [{ path: 'location', message: `${record.location} is not in the location master data` }],
              stage: 'sensing',
              source: record.source,
              location: record.location,
              arrivalMs: record.arrivalMs,
              raw: JSON.stringify(record.record),
            }),
          ),
        );
        return;
      }
      tally = { items: {}, closes: {}, ...(options.padBytes ? { pad: 'x'.repeat(options.padBytes) } : {}) };
    }
    open!.touched.set(record.location, tally);
    if (record.kind === 'order-line') {
      const entry = (tally.items[record.record.item] ??= { quantity: 0, lines: 0 });
      entry.quantity += record.record.quantity ?? 0;
      entry.lines += 1;
    } else if (record.kind === 'day-closed') {
      const date = record.record.date;
      const revision = (tally.closes[date] = (tally.closes[date] ?? 0) + 1);
      const plans = Object.keys(tally.items)
        .sort()
        .map((item) => tallyPlan(record.location, item, date, revision, tally.items[item]!.quantity, tally.items[item]!.lines));
      for (const p of plans) outputs.push(planOutput(SOURCE, p, record.knowledgeMs));
      outputs.push(manifestOutput(SOURCE, buildManifest(record.location as Plan['location'], date, revision, plans, []), record.knowledgeMs));
    }
  };

  return {
    partition,
    nextOffset: () => (open ? open.offset : offset).toString(),
    locations: () => [...committed.keys()].filter((k) => k !== PARTITION_STATE_KEY).sort(),
    apply(batch: readonly LogEntry[]): BatchResult {
      if (open) throw new Error('a batch is still open');
      open = { offset, touched: new Map() };
      const outputs: OutputRecord[] = [];
      for (const e of batch) {
        if (BigInt(e.offset) < open.offset) continue;
        applyOne(e.record, outputs);
        open.offset = BigInt(e.offset) + 1n;
      }
      const changelog: ChangelogEntry[] = [...open.touched].sort(([a], [b]) => (a < b ? -1 : 1)).map(([key, t]) => ({ key, value: JSON.stringify(t) }));
      changelog.push({ key: PARTITION_STATE_KEY, value: JSON.stringify({ nextOffset: open.offset.toString() }) });
      return { outputs, changelog, nextOffset: open.offset.toString(), closes: [] };
    },
    commit() {
      if (!open) return;
      for (const [k, t] of open.touched) committed.set(k, JSON.stringify(t));
      offset = open.offset;
      open = null;
    },
    abort() {
      open = null;
    },
    restore(entries: Iterable<ChangelogEntry>) {
      committed = new Map();
      offset = 0n;
      open = null;
      for (const { key, value } of entries) {
        if (key === PARTITION_STATE_KEY) {
          offset = value === null ? 0n : BigInt((JSON.parse(value) as { nextOffset: string }).nextOffset);
        } else if (value === null) committed.delete(key);
        else committed.set(key, value);
      }
    },
  };
}
