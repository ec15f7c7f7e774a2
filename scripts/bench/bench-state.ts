// One location's sensing state built from a 13-week bench history without the stage's day closes (cheap: the
// model applies the facts directly), and its changelog as a running sensing stage leaves it.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { RecordValidator } from '../../src/contracts/validate.ts';
import { writeHistory } from '../../src/demo/write-history.ts';
import type { EventLogRecord } from '../../src/runtime/event-log-record.ts';
import { historyStream } from '../../src/runtime/history/history-stream.ts';
import { addDays, isBusinessDay, localDateOf } from '../../src/runtime/local-day.ts';
import type { LocationModel, LocationModelFactory } from '../../src/runtime/location-model-port.ts';
import { newRuntimeState, type LocationRuntimeState } from '../../src/runtime/location-runtime-state.ts';
import { DEFAULT_STAGE_SETTINGS } from '../../src/runtime/stage-settings.ts';
import { PARTITION_STATE_KEY, type ChangelogEntry } from '../../src/runtime/stage-output.ts';
import { benchHistory } from './bench-history.ts';

export type BenchMaster = EventLogRecord['record'] & { location: string; timeZone: string };

export interface BenchLocation {
  readonly master: BenchMaster;
  readonly model: LocationModel;
  /** The runtime state of a location whose next day to close is the first held-back day, else `day`. */
  readonly runtime: LocationRuntimeState;
  /** The last business day of the history. */
  readonly day: string;
  /** The held-back business days, ending with `day` (empty when none were held back). */
  readonly heldDays: readonly string[];
  /** Facts that arrived on the held-back days (local dates), in arrival order, not applied to the model. */
  readonly held: readonly EventLogRecord[];
  readonly lastFact: EventLogRecord;
  readonly facts: number;
  readonly generateMs: number;
  readonly applyMs: number;
}

/** `holdBusinessDays`: the facts of the history's last n business days are returned instead of applied. */
export async function buildBenchLocation(series: number, models: LocationModelFactory, weeks = 13, holdBusinessDays = 0): Promise<BenchLocation> {
  const t0 = performance.now();
  // The generated history is written out and dropped: only what a running stage holds stays in memory.
  const input = mkdtempSync(path.join(tmpdir(), 'nc-bench-history-'));
  try {
    const { master, scenario } = (() => {
      const { history, scenario } = benchHistory({ centres: 1, itemsPerCentre: series, weeks });
      writeHistory(input, history);
      return { master: history.locations[0] as BenchMaster, scenario };
    })();
    const model = models.create(master as never);
    const businessDays: string[] = [];
    for (let d = scenario.cutAt.slice(0, 10); businessDays.length < Math.max(1, holdBusinessDays); ) {
      d = addDays(d, -1);
      if (isBusinessDay(master as never, d)) businessDays.unshift(d);
    }
    const day = businessDays[businessDays.length - 1]!;
    const heldDays = holdBusinessDays > 0 ? businessDays : [];
    const held: EventLogRecord[] = [];
    let facts = 0;
    let lastFact: EventLogRecord | undefined;
    const t1 = performance.now();
    for await (const r of historyStream(input, { validator: new RecordValidator(), settings: DEFAULT_STAGE_SETTINGS, onRejected: () => {} })) {
      if (r.kind !== 'order-line' && r.kind !== 'shipment' && r.kind !== 'baseline-version') continue;
      if (heldDays.length > 0) {
        const arrived = localDateOf(r.arrivalMs, master.timeZone);
        if (arrived > day) continue;
        if (arrived >= heldDays[0]!) {
          held.push(r);
          continue;
        }
      }
      model.apply(r);
      facts++;
      lastFact = r;
    }
    const t2 = performance.now();
    if (!lastFact) throw new Error('the bench history holds no facts');
    const runtime = { ...newRuntimeState(master as never, lastFact.arrivalMs), nextDate: heldDays[0] ?? day, lastFeedArrivalMs: lastFact.arrivalMs };
    return { master, model, runtime, day, heldDays, held, lastFact, facts, generateMs: t1 - t0, applyMs: t2 - t1 };
  } finally {
    rmSync(input, { recursive: true, force: true });
  }
}

/** The changelog entries the sensing stage writes for this location (base, parts in key order, partition state). */
export function benchChangelog(location: BenchLocation, nextOffset = '0', partition = 0): ChangelogEntry[] {
  const { base, parts } = location.model.snapshotParts!();
  const key = location.master.location;
  return [
    { key, value: JSON.stringify({ runtime: location.runtime, model: base, parted: true }) },
    ...[...parts].sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0)).map(([k, v]) => ({ key: `${key}|${k}`, value: v === null ? null : JSON.stringify(v) })),
    { key: PARTITION_STATE_KEY, value: JSON.stringify({ partition, nextOffset }) },
  ];
}
