import { createHash } from 'node:crypto';
import type { AccuracySummary } from '../contracts/accuracy-summary.ts';
import type { Alert } from '../contracts/alert.ts';
import { cloudEvent, deterministicId } from '../contracts/cloudevents.ts';
import { SCHEMA_BASE_URI, schemaFileName } from '../contracts/json-schema.ts';
import { MANIFEST_SCHEMA_VERSION, type Manifest } from '../contracts/manifest.ts';
import type { Plan } from '../contracts/plan.ts';
import { EVENT_TYPES } from '../contracts/records.ts';
import type { ReplanEntry } from '../contracts/replan-entry.ts';
import { deadLetterKey, type DeadLetterRecord } from './dead-letter.ts';
import type { OutputRecord } from './stage-output.ts';

// Output records of a close, each in its CloudEvents envelope with a deterministic id and the close instant as
// `time`, so a replay of the same log yields byte-identical messages and consumers de-duplicate by id.

export const DEAD_LETTER_EVENT_TYPE = 'io.nearcast.dead-letter.v1';

const iso = (ms: number) => new Date(ms).toISOString();

/** The exact text a plan travels as (the Kafka value, the NDJSON line): the manifest checksum is taken over it. */
export function planText(plan: Plan): string {
  return JSON.stringify(plan);
}

/** SHA-256 (hex) over each plan's text followed by a line feed, in key order (the order they are published). */
export function plansChecksum(plans: readonly Plan[], texts: readonly string[] = plans.map(planText)): string {
  const hash = createHash('sha256');
  for (const t of texts) hash.update(`${t}\n`);
  return hash.digest('hex');
}

// A close writes each plan's text once, for the manifest checksum; the transports send that same text instead of
// encoding the plan a second time (10k plans of a few kilobytes each). Keyed by the envelope, which nothing alters.
const dataTexts = new WeakMap<object, string>();

/** The JSON text of an output's data: what travels as the Kafka value or the stored row. */
export function outputDataText(output: OutputRecord): string {
  return dataTexts.get(output.event) ?? JSON.stringify(output.event.data);
}

/** `text` is planText(plan) when the caller already has it. */
export function planOutput(source: string, plan: Plan, timeMs: number, text?: string): OutputRecord {
  const key = `${plan.location}|${plan.item}`;
  const output: OutputRecord = {
    topic: 'plans',
    key,
    location: plan.location,
    event: cloudEvent(
      {
        id: deterministicId('plan', plan.location, plan.item, plan.planDate, plan.revision),
        source,
        type: EVENT_TYPES.plan,
        time: iso(timeMs),
        subject: key,
        dataschema: `${SCHEMA_BASE_URI}${schemaFileName('plan')}`,
      },
      plan,
    ),
  };
  if (text !== undefined) dataTexts.set(output.event, text);
  return output;
}

/** `texts` are the plans' planText() when the caller already has them. */
export function buildManifest(location: Manifest['location'], planDate: string, revision: number, plans: readonly Plan[], model: Manifest['model'], texts?: readonly string[]): Manifest {
  return { schemaVersion: MANIFEST_SCHEMA_VERSION, location, planDate, revision, seriesCount: plans.length, checksum: plansChecksum(plans, texts), model: [...model] };
}

export function manifestOutput(source: string, manifest: Manifest, timeMs: number): OutputRecord {
  const key = `${manifest.location}|#manifest`;
  return {
    topic: 'plans',
    key,
    location: manifest.location,
    event: cloudEvent(
      {
        id: deterministicId('manifest', manifest.location, manifest.planDate, manifest.revision),
        source,
        type: EVENT_TYPES.manifest,
        time: iso(timeMs),
        subject: key,
        dataschema: `${SCHEMA_BASE_URI}${schemaFileName('manifest')}`,
      },
      manifest,
    ),
  };
}

export function alertKey(alert: Pick<Alert, 'location' | 'item' | 'rule' | 'episodeStart'>): string {
  return `${alert.location}|${alert.item}|${alert.rule}|${alert.episodeStart}`;
}

export function alertOutput(source: string, alert: Alert, timeMs: number): OutputRecord {
  const key = alertKey(alert);
  return {
    topic: 'alerts',
    key,
    location: alert.location,
    event: cloudEvent(
      { id: deterministicId('alert', key, alert.seq), source, type: EVENT_TYPES.alert, time: iso(timeMs), subject: key, dataschema: `${SCHEMA_BASE_URI}${schemaFileName('alert')}` },
      alert,
    ),
  };
}

export function replanOutput(source: string, entry: ReplanEntry, timeMs: number): OutputRecord {
  const key = `${entry.location}|${entry.item}|#replan`;
  return {
    topic: 'alerts',
    key,
    location: entry.location,
    event: cloudEvent(
      { id: deterministicId('replan', key, entry.weekOf, entry.reason), source, type: EVENT_TYPES['replan-entry'], time: iso(timeMs), subject: key, dataschema: `${SCHEMA_BASE_URI}${schemaFileName('replan-entry')}` },
      entry,
    ),
  };
}

export function accuracyOutput(source: string, summary: AccuracySummary, timeMs: number): OutputRecord {
  const key = `${summary.location}|${summary.lead}|${summary.volumeBand}`;
  return {
    topic: 'accuracy',
    key,
    location: summary.location,
    event: cloudEvent(
      {
        id: deterministicId('accuracy', key, summary.throughWeek),
        source,
        type: EVENT_TYPES['accuracy-summary'],
        time: iso(timeMs),
        subject: key,
        dataschema: `${SCHEMA_BASE_URI}${schemaFileName('accuracy-summary')}`,
      },
      summary,
    ),
  };
}

export function deadLetterOutput(source: string, record: DeadLetterRecord): OutputRecord {
  const key = deadLetterKey(record.source);
  return {
    topic: 'deadLetter',
    key,
    location: record.location,
    event: cloudEvent({ id: deterministicId('dead-letter', key, record.code), source, type: DEAD_LETTER_EVENT_TYPE, time: iso(record.arrivalMs), subject: key }, record),
  };
}
