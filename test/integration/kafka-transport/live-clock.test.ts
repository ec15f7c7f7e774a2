import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Config } from '../../../src/config/config.ts';
import { decodeEventLogRecord, type EventLogRecord } from '../../../src/runtime/event-log-record.ts';
import { createSensingStage } from '../../../src/runtime/sensing-stage.ts';
import type { IncomingMessage, KafkaPort } from '../../../src/transport/kafka/kafka-port.ts';
import { serveKafka, type KafkaService } from '../../../src/transport/kafka/serve-kafka.ts';
import { eventLogMessages, produce, readAll, setUpTopics, testLogger, testPort, transportConfig } from './helpers/harness.ts';
import { orderLine } from './helpers/scenario.ts';
import { tallyModels } from './helpers/tally-models.ts';
import { waitFor } from './helpers/wait.ts';

// Live mode on Kafka: the owner of each event-log partition turns the (here injected) wall clock into deadline-close
// and feed-health-check records in the event log. DC-NORTH never gets a day-closed record, so only its deadline can
// close its day; DC-SOUTH is closed by a day-closed record first, so its deadline close must change nothing. The
// runtime's real sensing stage decides the closes (tallyModels only supplies the numbers: summed quantities).

const at = (iso: string) => Date.parse(iso);
const location = (id: string) => ({ location: id, timeZone: 'Europe/Berlin', weekStart: 'monday', businessHours: { open: '06:00', close: '22:00' } });

function envelope(kind: EventLogRecord['kind'], record: Record<string, unknown> & { location: string }, arrivalMs: number, line: number): EventLogRecord {
  return { v: 1, kind, location: record.location, knowledgeMs: arrivalMs, arrivalMs, source: { kind: 'file', file: 'live-clock', line }, record } as EventLogRecord;
}

/** Monday 2026-03-02: master data, then order lines from 09:30 Berlin time (08:30Z) on. */
function records(): EventLogRecord[] {
  const t0 = at('2026-03-02T08:30:00Z');
  return [
    envelope('location', location('DC-NORTH'), t0 - 60_000, 1),
    envelope('location', location('DC-SOUTH'), t0 - 60_000, 2),
    envelope('order-line', orderLine(1, 'DC-NORTH', 'COLA-1L', 10, 0), t0, 3),
    envelope('order-line', orderLine(2, 'DC-NORTH', 'COLA-1L', 5, 0), t0 + 60_000, 4),
    envelope('order-line', orderLine(3, 'DC-NORTH', 'TONIC-200', 7, 0), t0 + 120_000, 5),
    envelope('order-line', orderLine(4, 'DC-SOUTH', 'COLA-1L', 3, 0), t0 + 180_000, 6),
    envelope('day-closed', { eventId: 'close-south-0', location: 'DC-SOUTH', date: '2026-03-02' }, at('2026-03-02T21:30:00Z'), 7),
  ];
}

const data = (m: IncomingMessage) => JSON.parse(m.value!.toString('utf8')) as Record<string, unknown>;

describe('the live clock on Kafka', () => {
  let config: Config;
  let port: KafkaPort;
  let service: KafkaService | undefined;
  let nowMs = at('2026-03-02T20:00:00Z'); // 21:00 in Berlin: Monday's deadline (Tuesday 04:00) still ahead

  const start = () =>
    serveKafka(config, testLogger(config), {
      stages: ['sensing'],
      createStage: (partition) => createSensingStage({ partition, models: tallyModels, settings: { demandBasis: 'orders' } }),
      handleSignals: false,
      setUpTopics: false,
      port,
      clock: { now: () => nowMs, intervalMs: 100 },
    });

  const manifests = async (loc: string): Promise<string[]> =>
    (await readAll(port, config.topics.plans)).filter((m) => m.key === `${loc}|#manifest`).map((m) => data(m).planDate as string);

  const clockRecords = async (): Promise<EventLogRecord[]> =>
    (await readAll(port, config.topics.events)).map((m) => decodeEventLogRecord(m.value!)).filter((r) => r.kind === 'deadline-close' || r.kind === 'feed-health-check');

  beforeAll(async () => {
    config = transportConfig('clock');
    port = testPort(config);
    await setUpTopics(config, port);
  });

  afterAll(async () => {
    await service?.stop();
    const admin = await port.admin();
    await admin.deleteTopics(Object.values(config.topics)).catch(() => undefined);
    await admin.close();
  });

  it('closes a day that no day-closed record closes once its deadline passes, and its plans appear', async () => {
    await produce(port, eventLogMessages(config, records()));
    service = await start();
    await waitFor('the day-closed record to close DC-SOUTH', async () => (await manifests('DC-SOUTH')).length === 1, 60_000, 500);
    expect(await manifests('DC-NORTH')).toEqual([]);

    nowMs = at('2026-03-03T03:30:00Z'); // 04:30 Tuesday in Berlin: Monday's 04:00 deadline has passed
    await waitFor('the deadline to close DC-NORTH', async () => (await manifests('DC-NORTH')).length === 1, 60_000, 500);

    const plans = (await readAll(port, config.topics.plans)).filter((m) => m.key?.startsWith('DC-NORTH|') && m.key !== 'DC-NORTH|#manifest');
    const adjusted = Object.fromEntries(plans.map((m) => [data(m).item, (data(m).leads as { adjusted: number }[])[0]!.adjusted]));
    // By hand from records(): COLA-1L 10 + 5, TONIC-200 7.
    expect(adjusted).toEqual({ 'COLA-1L': 15, 'TONIC-200': 7 });
    expect(plans.every((m) => data(m).planDate === '2026-03-02')).toBe(true);

    const deadlines = (await clockRecords()).filter((r) => r.kind === 'deadline-close');
    // 04:00 on 2026-03-03 in Berlin is 03:00Z (CET = UTC+1 until the last Sunday of March).
    expect(deadlines.map((r) => [r.location, r.record])).toEqual(
      expect.arrayContaining([
        ['DC-NORTH', { location: 'DC-NORTH', date: '2026-03-02', deadlineMs: at('2026-03-03T03:00:00Z') }],
        ['DC-SOUTH', { location: 'DC-SOUTH', date: '2026-03-02', deadlineMs: at('2026-03-03T03:00:00Z') }],
      ]),
    );
    expect(deadlines).toHaveLength(2);
    // DC-SOUTH's day was already closed by its day-closed record: its deadline close publishes nothing more.
    expect(await manifests('DC-SOUTH')).toEqual(['2026-03-02']);
  });

  it('writes feed-health checks each full hour of business from open + 3 h, after the first record', async () => {
    const checks = (await clockRecords()).filter((r) => r.kind === 'feed-health-check' && r.location === 'DC-NORTH');
    // First record 09:30 Berlin; checks on full hours from 06:00 + 3 h = 09:00 to the 22:00 close, after 09:30:
    // 10:00 … 22:00 Berlin = 09:00Z … 21:00Z, 13 checks (nothing on Tuesday before 09:00).
    expect(checks.map((r) => (r.record as { atMs: number }).atMs)).toEqual(Array.from({ length: 13 }, (_, i) => at('2026-03-02T09:00:00Z') + i * 3_600_000));
  });

  it('after a restart goes on from its committed cursors: no second close of a day, the next deadline once', async () => {
    await service!.stop();
    nowMs = at('2026-03-03T03:40:00Z');
    service = await start();
    await waitFor('all partitions restored', () => service!.sensing!.readyPartitions().length === config.kafka.partitions);
    nowMs = at('2026-03-04T03:30:00Z'); // past Tuesday's deadline (Wednesday 04:00 Berlin = 03:00Z)
    await waitFor('the deadline to close DC-NORTH on Tuesday', async () => (await manifests('DC-NORTH')).length === 2, 60_000, 500);

    expect(await manifests('DC-NORTH')).toEqual(['2026-03-02', '2026-03-03']);
    const deadlines = (await clockRecords()).filter((r) => r.kind === 'deadline-close' && r.location === 'DC-NORTH');
    expect(deadlines.map((r) => (r.record as { date: string }).date)).toEqual(['2026-03-02', '2026-03-03']);
  });
});
