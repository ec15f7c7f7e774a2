import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Config } from '../../../src/config/config.ts';
import type { Plan } from '../../../src/contracts/plan.ts';
import type { DeadLetterRecord } from '../../../src/runtime/dead-letter.ts';
import type { KafkaPort, WrittenOffset } from '../../../src/transport/kafka/kafka-port.ts';
import type { KafkaService } from '../../../src/transport/kafka/serve-kafka.ts';
import { readAll, setUpTopics, testPort, transportConfig } from './helpers/harness.ts';
import { inputMessages, startPipeline, waitIngested, waitSensed } from './helpers/pipeline.ts';
import { locationRecord, orderLine } from './helpers/scenario.ts';
import { tallyModels } from './helpers/tally-models.ts';

// Bad records in the middle of good ones: each lands in the dead-letter topic with its reason and where it came
// from (topic, partition, offset), and the good records around it are all applied.

describe('poison records on the input topics', () => {
  let config: Config;
  let port: KafkaPort;
  let service: KafkaService;

  beforeAll(async () => {
    config = transportConfig('poison', { partitions: 2 });
    port = testPort(config);
    await setUpTopics(config, port);
    service = await startPipeline(config, port, tallyModels);
  });

  afterAll(async () => {
    await service?.stop();
    const admin = await port.admin();
    await admin.deleteTopics(Object.values(config.topics)).catch(() => undefined);
    await admin.close();
  });

  it('are dead-lettered with reasons while the good records around them are processed', async () => {
    const producer = await port.producer();
    const send = async (role: 'orders' | 'shipments' | 'dayCloses' | 'locations', key: string, value: string): Promise<WrittenOffset> => {
      const [w] = await producer.send(inputMessages(config, [{ role, key, value }]));
      return w!;
    };
    await send('locations', 'DC-NORTH', JSON.stringify(locationRecord('DC-NORTH')));
    await waitIngested(port, config, ['locations']);

    // Good lines: SPARK-LEMON-330 gets 100 + 50 = 150, COLA-1L gets 70 (sums worked out by hand).
    await send('orders', 'DC-NORTH', JSON.stringify(orderLine(1, 'DC-NORTH', 'SPARK-LEMON-330', 100, 0)));
    const malformed = await send('orders', 'DC-NORTH', '{"eventId": "ev-2", "location": ');
    const wrongType = await send('orders', 'DC-NORTH', JSON.stringify({ ...orderLine(3, 'DC-NORTH', 'COLA-1L', 5, 0), quantity: 'lots' }));
    await send('orders', 'DC-NORTH', JSON.stringify(orderLine(4, 'DC-NORTH', 'COLA-1L', 70, 0)));
    const unknown = await send('orders', 'DC-ATLANTIS', JSON.stringify(orderLine(5, 'DC-ATLANTIS', 'COLA-1L', 9, 0)));
    const absurd = await send('orders', 'DC-NORTH', JSON.stringify(orderLine(6, 'DC-NORTH', 'COLA-1L', 5e9, 0)));
    const badShipment = await send('shipments', 'DC-NORTH', JSON.stringify({ eventId: 'ev-7', shipmentId: 'SH-1', location: 'DC-NORTH', item: 'COLA-1L', quantity: 3, shippedAt: 12345 }));
    await send('orders', 'DC-NORTH', JSON.stringify(orderLine(8, 'DC-NORTH', 'SPARK-LEMON-330', 50, 0)));
    await producer.close();
    await waitIngested(port, config, ['orders', 'shipments']);
    await closeTheDay();
    await waitSensed(port, config);

    const dead = (await readAll(port, config.topics.deadLetter)).map((m) => JSON.parse(m.value!.toString()) as DeadLetterRecord);
    const at = (w: WrittenOffset) => dead.find((d) => d.source.kind === 'topic' && d.source.topic === w.topic && d.source.partition === w.partition && d.source.offset === w.offset);
    expect(dead).toHaveLength(5);
    expect(at(malformed)).toMatchObject({ code: 'NEARCAST_INPUT_MALFORMED_JSON', stage: 'ingest', reason: 'The record is not valid JSON: is not valid JSON' });
    expect(at(wrongType)).toMatchObject({ code: 'NEARCAST_INPUT_INVALID', stage: 'ingest' });
    expect(at(wrongType)!.issues.map((i) => i.path)).toEqual(['quantity']);
    expect(at(absurd)!.code).toBe('NEARCAST_INPUT_INVALID');
    expect(at(absurd)!.reason).toMatch(/^The record does not match its contract: quantity: /);
    expect(at(badShipment)!.issues.map((i) => i.path)).toEqual(['shippedAt']);
    // Valid by contract, so the ingest stage passes it on; the sensing stage, which knows the master data, refuses it.
    expect(at(unknown)).toMatchObject({ code: 'NEARCAST_INPUT_UNKNOWN_LOCATION', stage: 'sensing', location: 'DC-ATLANTIS', retriable: true });

    const plans = (await readAll(port, config.topics.plans)).filter((m) => !m.key!.endsWith('#manifest')).map((m) => JSON.parse(m.value!.toString()) as Plan);
    const totals = Object.fromEntries(plans.map((p) => [p.item, p.leads[0]!.adjusted]));
    expect(totals).toEqual({ 'SPARK-LEMON-330': 150, 'COLA-1L': 70 });

    async function closeTheDay(): Promise<void> {
      const p = await port.producer();
      await p.send(inputMessages(config, [{ role: 'dayCloses', key: 'DC-NORTH', value: JSON.stringify({ eventId: 'close-1', location: 'DC-NORTH', date: '2026-03-02' }) }]));
      await p.close();
      await waitIngested(port, config, ['dayCloses']);
    }
  });
});
