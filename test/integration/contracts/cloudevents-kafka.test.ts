import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Admin, Producer } from 'kafkajs';
import { cloudEvent, deterministicId, fromKafkaBinary, toKafkaBinary } from '../../../src/contracts/cloudevents.ts';
import { EVENT_TYPES } from '../../../src/contracts/records.ts';
import { consumeUntil, kafka, uniqueTopic } from '../helpers/kafka.ts';

// Binary content mode of the CloudEvents Kafka protocol binding (cloudevents/spec v1.0.2,
// kafka-protocol-binding.md §3.2): attributes as `ce_` headers, datacontenttype as `content-type`, data as the value.

describe('CloudEvents records through a real Kafka broker', () => {
  const topic = uniqueTopic('nearcast-it-cloudevents');
  let admin: Admin;
  let producer: Producer;

  beforeAll(async () => {
    admin = kafka().admin();
    await admin.connect();
    await admin.createTopics({ topics: [{ topic, numPartitions: 2 }], waitForLeaders: true });
    producer = kafka().producer({ idempotent: true, maxInFlightRequests: 1 });
    await producer.connect();
  });

  afterAll(async () => {
    await producer?.disconnect();
    await admin?.deleteTopics({ topics: [topic] }).catch(() => undefined);
    await admin?.disconnect();
  });

  it('creates a topic, produces plan records with ce_ headers and consumes them back intact', async () => {
    const plans = ['COLA-1L', 'SPARK-LEMON-330', 'ICED-TEA-500'].map((item) => ({ location: 'DC-NORTH', item, planDate: '2026-03-05', revision: 1 }));
    const events = plans.map((p) =>
      cloudEvent(
        {
          id: deterministicId('plan', p.location, p.item, p.planDate, p.revision),
          source: `/nearcast/${p.location}`,
          type: EVENT_TYPES.plan,
          time: '2026-03-05T23:30:00Z',
          subject: `${p.location}|${p.item}`,
        },
        p,
      ),
    );
    await producer.send({
      topic,
      messages: events.map((e) => ({ key: e.subject!, ...toKafkaBinary(e) })),
    });

    const received = await consumeUntil({ topic, until: (r) => r.length >= events.length });
    expect(received).toHaveLength(3);
    for (const r of received) {
      expect(r.headers.ce_specversion).toBe('1.0');
      expect(r.headers.ce_type).toBe('io.nearcast.plan.v1');
      expect(r.headers.ce_source).toBe('/nearcast/DC-NORTH');
      expect(r.headers['content-type']).toBe('application/json');
      expect(r.headers.ce_id).toMatch(/^[0-9a-f]{32}$/);
      const back = fromKafkaBinary(r.headers, r.value!);
      const sent = events.find((e) => e.id === back.id);
      expect(back).toEqual(sent);
      expect(r.key).toBe(sent!.subject);
    }
  });
});
