import { mkdirSync } from 'node:fs';
import path from 'node:path';
import type { Plan } from '../../contracts/plan.ts';
import { RecordValidator } from '../../contracts/validate.ts';
import type { InputLimits } from '../../contracts/primitives.ts';
import type { DeadLetterRecord } from '../dead-letter.ts';
import type { LogEntry } from '../event-log-record.ts';
import { historyStream, type Rejection } from '../history/history-stream.ts';
import type { LocationModelFactory } from '../location-model-port.ts';
import { outputDataText } from '../output-records.ts';
import { createSensingStage } from '../sensing-stage.ts';
import { DEFAULT_STAGE_SETTINGS, type StageSettings } from '../stage-settings.ts';
import type { OutputRecord } from '../stage-output.ts';
import { AccuracyReporter } from './accuracy-report.ts';
import { NdjsonFile, writeJsonFile } from './output-files.ts';

// `nearcast backtest`: replays a history folder through the sensing stage in event time only (the replay clock is
// the stream's own arrival time) and writes what a live run would have published. Deterministic: the same input
// gives byte-identical files.

export interface BacktestOptions {
  readonly input: string;
  readonly out: string;
  readonly models: LocationModelFactory;
  readonly limits?: InputLimits;
  readonly settings?: Partial<StageSettings>;
  /** Log records per applied batch. */
  readonly batchSize?: number;
  /** Progress lines (stderr in the CLI); called every `progressEvery` log records and at the end. */
  readonly progress?: (line: string) => void;
  readonly progressEvery?: number;
  /** End of the history (epoch ms): the replay clock runs on to it after the last record. */
  readonly untilMs?: number;
}

export interface BacktestSummary {
  readonly logRecords: number;
  readonly closes: number;
  readonly plans: number;
  readonly manifests: number;
  readonly alerts: number;
  readonly rejected: number;
  readonly files: readonly string[];
}

export const BACKTEST_FILES = ['plans.ndjson', 'manifests.ndjson', 'alerts.ndjson', 'rejected.ndjson', 'accuracy.json'] as const;

export async function runBacktest(options: BacktestOptions): Promise<BacktestSummary> {
  const settings: StageSettings = { ...DEFAULT_STAGE_SETTINGS, ...options.settings, changelog: false };
  mkdirSync(options.out, { recursive: true });
  const plans = new NdjsonFile(path.join(options.out, 'plans.ndjson'));
  const manifests = new NdjsonFile(path.join(options.out, 'manifests.ndjson'));
  const alerts = new NdjsonFile(path.join(options.out, 'alerts.ndjson'));
  const rejected: Rejection[] = [];
  const accuracy = new AccuracyReporter();
  const stage = createSensingStage({ partition: 0, models: options.models, settings });
  const validator = new RecordValidator(options.limits);
  const batchSize = options.batchSize ?? 2_000;
  const progressEvery = options.progressEvery ?? 100_000;
  let logRecords = 0;
  let closes = 0;
  let lastClose = '';
  const counts = { plans: 0, manifests: 0, alerts: 0 };

  const route = (o: OutputRecord) => {
    const text = outputDataText(o);
    if (o.topic === 'plans') {
      if (o.key.endsWith('|#manifest')) {
        manifests.write(text);
        counts.manifests++;
      } else {
        plans.write(text);
        accuracy.add(o.event.data as Plan);
        counts.plans++;
      }
    } else if (o.topic === 'alerts') {
      alerts.write(text);
      counts.alerts++;
    } else if (o.topic === 'deadLetter') {
      const dl = o.event.data as DeadLetterRecord;
      if (dl.source.kind === 'file') rejected.push({ file: dl.source.file, line: dl.source.line, code: dl.code, reason: dl.reason, issues: dl.issues, type: dl.type, raw: dl.raw });
    }
  };

  let batch: LogEntry[] = [];
  const flush = () => {
    if (batch.length === 0) return;
    const result = stage.apply(batch);
    stage.commit();
    for (const o of result.outputs) route(o);
    closes += result.closes.length;
    const last = result.closes.at(-1);
    if (last) lastClose = `${last.location} ${last.planDate}`;
    batch = [];
  };

  const stream = historyStream(options.input, { validator, settings, onRejected: (r) => rejected.push(r), requireShipments: settings.demandBasis === 'shipments', clockUntilMs: options.untilMs });
  for await (const record of stream) {
    batch.push({ offset: String(logRecords), record });
    logRecords++;
    if (batch.length >= batchSize) flush();
    if (options.progress && logRecords % progressEvery === 0) {
      options.progress(`backtest: ${logRecords} records logged, ${closes} closes, ${counts.plans} plans${lastClose ? `, last close ${lastClose}` : ''}`);
    }
  }
  flush();
  plans.close();
  manifests.close();
  alerts.close();

  rejected.sort((a, b) => (a.file < b.file ? -1 : a.file > b.file ? 1 : a.line - b.line));
  const rejectedFile = new NdjsonFile(path.join(options.out, 'rejected.ndjson'));
  // rejected.ndjson names each bad line and why; the line itself stays in the input file.
  for (const r of rejected) rejectedFile.write(JSON.stringify({ file: r.file, line: r.line, code: r.code, reason: r.reason, issues: r.issues }));
  rejectedFile.close();
  writeJsonFile(path.join(options.out, 'accuracy.json'), accuracy.report());
  options.progress?.(`backtest: done — ${logRecords} records, ${closes} closes, ${counts.plans} plans, ${counts.alerts} alert changes, ${rejected.length} rejected lines`);
  return { logRecords, closes, ...counts, rejected: rejected.length, files: BACKTEST_FILES.map((f) => path.join(options.out, f)) };
}
