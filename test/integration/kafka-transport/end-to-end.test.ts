import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Config } from '../../../src/config/config.ts';
import { decodeEventLogRecord } from '../../../src/runtime/event-log-record.ts';
import { EmbeddedRuntime } from '../../../src/transport/embedded/embedded-runtime.ts';
import { EmbeddedStore } from '../../../src/transport/embedded/embedded-store.ts';
import type { KafkaPort } from '../../../src/transport/kafka/kafka-port.ts';
import type { KafkaService } from '../../../src/transport/kafka/serve-kafka.ts';
import { keyedLines, readAll, setUpTopics, testPort, transportConfig } from './helpers/harness.ts';
import { feed, startPipeline } from './helpers/pipeline.ts';
import { createCoreModels } from '../../../src/runtime/core-location-model.ts';
import { demoInputs } from './helpers/scenario.ts';

// The demo's distributor (14 weeks, 3 centres, 4 items: order lines, revisions, shipments, baselines, day closes, a
// heat wave) produced to the input topics goes through the Kafka ingest stage and the Kafka sensing stage with the
// real sensing and monitoring engine; the same event log, read back and run through the embedded (SQLite) runtime,
// must publish the very same plan, manifest and alert records: same keys, CloudEvents ids, bytes and order.

describe('nearcast on Kafka, end to end', () => {
  let config: Config;
  let port: KafkaPort;
  let service: KafkaService;
  let dir: string;

  beforeAll(async () => {
    config = transportConfig('e2e');
    port = testPort(config);
    await setUpTopics(config, port);
    service = await startPipeline(config, port, createCoreModels(config));
    dir = mkdtempSync(path.join(os.tmpdir(), 'nearcast-e2e-'));
  });

  afterAll(async () => {
    await service?.stop();
    rmSync(dir, { recursive: true, force: true });
    const admin = await port.admin();
    await admin.deleteTopics(Object.values(config.topics)).catch(() => undefined);
    await admin.close();
  });

  it('publishes the plans, manifests and alerts an embedded run over the same event log publishes', async () => {
    const inputs = await demoInputs(14, 4);
    await feed(port, config, inputs, 500);
    const events = await readAll(port, config.topics.events);
    // The generator writes valid records only: every one reaches the event log, none is dead-lettered by ingest.
    expect(events).toHaveLength(inputs.length);

    const store = new EmbeddedStore(path.join(dir, 'reference.sqlite'), { partitions: config.kafka.partitions });
    const embedded = new EmbeddedRuntime({ store, models: createCoreModels(config), settings: { demandBasis: config.demandBasis } });
    embedded.append(events.map((m) => decodeEventLogRecord(m.value!)));
    embedded.pump();
    const expected = (topic: 'plans' | 'alerts') => store.outputs(topic).map((o) => `${o.key}|${o.id}|${o.data}`);
    const plans = expected('plans');
    const alerts = expected('alerts');
    store.close();

    expect(plans.filter((l) => l.includes('|#manifest|')).length).toBeGreaterThan(50);
    expect(alerts.length).toBeGreaterThan(0);
    // Kafka holds each location's records on its partition in publication order; the embedded pump goes partition
    // by partition too, so the sequences compare one to one.
    expect(keyedLines(await readAll(port, config.topics.plans))).toEqual(plans);
    expect(keyedLines(await readAll(port, config.topics.alerts))).toEqual(alerts);
  });
});
