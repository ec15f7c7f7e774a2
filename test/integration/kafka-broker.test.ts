import { ConfigResourceTypes, type Admin, type Kafka } from 'kafkajs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { brokerControlUnavailable, brokerPid, killBroker, restartBroker, startAgain } from './helpers/broker.ts';
import { consumeUntil, kafka, uniqueName, uniqueTopic, type ReceivedRecord } from './helpers/kafka.ts';

// Proves the test broker does, with kafkajs 2.2.4, everything nearcast relies on: admin, keyed records with
// headers, consumer groups, idempotent and transactional producers with sendOffsets, compacted topics, and
// data that survives a restart and a crash. Expected offsets are worked out by hand from Kafka's log model:
// each record takes one offset, and each transaction marker (commit or abort) takes one more.

const sleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));
const values = (records: readonly ReceivedRecord[]) => records.map((r) => r.value);

let client: Kafka;
let admin: Admin;

beforeAll(async () => {
  client = kafka();
  admin = client.admin();
  await admin.connect();
});

afterAll(async () => {
  await admin?.disconnect();
});

async function committedOffset(groupId: string, topic: string, partition = 0): Promise<string | undefined> {
  const [entry] = await admin.fetchOffsets({ groupId, topics: [topic] });
  return entry?.partitions.find((p) => p.partition === partition)?.offset;
}

describe('the Kafka test broker', () => {
  it('creates plain and compacted topics and reports their settings through describeConfigs', async () => {
    const plain = uniqueTopic('smoke-plain');
    const compacted = uniqueTopic('smoke-compacted');
    const created = await admin.createTopics({
      waitForLeaders: true,
      topics: [
        { topic: plain, numPartitions: 3, replicationFactor: 1 },
        {
          topic: compacted, numPartitions: 1, replicationFactor: 1,
          configEntries: [
            { name: 'cleanup.policy', value: 'compact' },
            { name: 'segment.ms', value: '100' },
            { name: 'segment.bytes', value: '16384' },
          ],
        },
      ],
    });
    expect(created).toBe(true);
    // createTopics resolves false for topics that already exist (kafkajs docs, Admin "Create topics").
    expect(await admin.createTopics({ topics: [{ topic: plain }] })).toBe(false);

    const metadata = await admin.fetchTopicMetadata({ topics: [plain] });
    expect(metadata.topics[0]?.partitions).toHaveLength(3);

    const described = await admin.describeConfigs({
      includeSynonyms: false,
      resources: [
        { type: ConfigResourceTypes.TOPIC, name: compacted, configNames: ['cleanup.policy', 'segment.ms', 'segment.bytes'] },
        { type: ConfigResourceTypes.TOPIC, name: plain, configNames: ['cleanup.policy'] },
      ],
    });
    const settings = (name: string) =>
      Object.fromEntries(described.resources.find((r) => r.resourceName === name)?.configEntries.map((e) => [e.configName, e.configValue]) ?? []);
    expect(settings(compacted)).toEqual({ 'cleanup.policy': 'compact', 'segment.ms': '100', 'segment.bytes': '16384' });
    // Kafka's default cleanup.policy is "delete" (kafka.apache.org/documentation, topic configs).
    expect(settings(plain)).toEqual({ 'cleanup.policy': 'delete' });
  });

  it('delivers records with their keys and headers to a consumer group, which commits the next offset', async () => {
    const topic = uniqueTopic('smoke-headers');
    await admin.createTopics({ waitForLeaders: true, topics: [{ topic, numPartitions: 1, replicationFactor: 1 }] });
    const producer = client.producer({ allowAutoTopicCreation: false });
    await producer.connect();
    await producer.send({
      topic,
      acks: -1,
      messages: [
        { key: 'DC-NORTH|SPARK-LEMON-330', value: '{"qty":120}', headers: { 'x-origin': 'order-desk', 'x-attempt': '1' } },
        { key: 'DC-SOUTH|COLA-1L', value: '{"qty":48}', headers: { 'x-origin': 'edi' } },
        { key: 'DC-COAST|COLA-1L', value: '{"qty":0}' },
      ],
    });
    await producer.disconnect();

    const groupId = uniqueName('smoke-group');
    const got = await consumeUntil({ topic, groupId, until: (r) => r.length >= 3 });
    expect(got.map((r) => [r.offset, r.key, r.value, r.headers])).toEqual([
      ['0', 'DC-NORTH|SPARK-LEMON-330', '{"qty":120}', { 'x-origin': 'order-desk', 'x-attempt': '1' }],
      ['1', 'DC-SOUTH|COLA-1L', '{"qty":48}', { 'x-origin': 'edi' }],
      ['2', 'DC-COAST|COLA-1L', '{"qty":0}', {}],
    ]);
    // Three records at offsets 0..2: the committed position is the next one to read, 3.
    expect(await committedOffset(groupId, topic)).toBe('3');
  });

  it('commits a consume-transform-produce transaction with sendOffsets and hides an aborted one from read-committed consumers', async () => {
    const input = uniqueTopic('smoke-tx-in');
    const output = uniqueTopic('smoke-tx-out');
    await admin.createTopics({ waitForLeaders: true, topics: [input, output].map((topic) => ({ topic, numPartitions: 1, replicationFactor: 1 })) });
    const plain = client.producer({ idempotent: true, maxInFlightRequests: 1, allowAutoTopicCreation: false });
    await plain.connect();
    await plain.send({ topic: input, acks: -1, messages: [{ key: 'a', value: 'in-1' }, { key: 'b', value: 'in-2' }] });

    const groupId = uniqueName('smoke-tx-group');
    const consumed = await consumeUntil({ topic: input, groupId, autoCommit: false, until: (r) => r.length >= 2 });
    expect(values(consumed)).toEqual(['in-1', 'in-2']);
    expect(await committedOffset(groupId, input)).toBe('-1'); // nothing committed yet: kafkajs reports -1

    const tx = client.producer({ transactionalId: uniqueName('smoke-tx'), idempotent: true, maxInFlightRequests: 1, allowAutoTopicCreation: false });
    await tx.connect();
    const aborted = await tx.transaction();
    await aborted.send({ topic: output, messages: [{ key: 'a', value: 'must-not-be-seen' }] });
    await aborted.abort();
    const committed = await tx.transaction();
    await committed.send({ topic: output, messages: consumed.map((r) => ({ key: r.key, value: `out-of-${r.value}` })) });
    // sendOffsets takes the next offset to read: last consumed offset 1, so 2.
    await committed.sendOffsets({ consumerGroupId: groupId, topics: [{ topic: input, partitions: [{ partition: 0, offset: '2' }] }] });
    await committed.commit();
    await tx.disconnect();
    // A plain record after both transactions: once a reader reaches it, it has passed everything before it.
    await plain.send({ topic: output, acks: -1, messages: [{ key: 'end', value: 'end-marker' }] });
    await plain.disconnect();

    expect(await committedOffset(groupId, input)).toBe('2');
    const readCommitted = await consumeUntil({ topic: output, until: (r) => r.at(-1)?.value === 'end-marker' });
    expect(values(readCommitted)).toEqual(['out-of-in-1', 'out-of-in-2', 'end-marker']);
    // Offsets: aborted record 0, abort marker 1 (the next transaction waits for it), committed records 2 and 3. The
    // commit returns once the coordinator has logged its decision, and the commit marker is written to the partition
    // after that (recalled from memory of the transaction protocol; seen here once): the end marker sent right
    // after lands at 5 behind the commit marker, or at 4 ahead of it.
    expect(readCommitted.slice(0, 2).map((r) => r.offset)).toEqual(['2', '3']);
    expect(['4', '5']).toContain(readCommitted[2]!.offset);
    const readUncommitted = await consumeUntil({ topic: output, readUncommitted: true, until: (r) => r.at(-1)?.value === 'end-marker' });
    expect(values(readUncommitted)).toEqual(['must-not-be-seen', 'out-of-in-1', 'out-of-in-2', 'end-marker']);
  });

  it('compacts a compacted topic to the latest record per key, rejects records without a key, and reads across the gaps', async () => {
    const topic = uniqueTopic('smoke-compact');
    await admin.createTopics({
      waitForLeaders: true,
      topics: [{
        topic, numPartitions: 1, replicationFactor: 1,
        configEntries: [
          { name: 'cleanup.policy', value: 'compact' },
          { name: 'segment.ms', value: '100' }, // roll (close) the segment on the first append after 100 ms
          { name: 'segment.bytes', value: '16384' },
          { name: 'min.cleanable.dirty.ratio', value: '0.01' },
          { name: 'min.compaction.lag.ms', value: '0' },
        ],
      }],
    });
    const producer = client.producer({ allowAutoTopicCreation: false });
    await producer.connect();
    // The broker refuses keyless records on compacted topics (Kafka docs, "Log Compaction"); kafkajs
    // surfaces that as the non-retriable INVALID_RECORD (tulios/kafkajs src/protocol/error.js).
    await expect(producer.send({ topic, messages: [{ key: null, value: 'no-key' }] })).rejects.toMatchObject({ type: 'INVALID_RECORD', retriable: false });

    await producer.send({ topic, acks: -1, messages: [
      { key: 'DC-NORTH', value: 'v1' }, { key: 'DC-SOUTH', value: 'v1' }, { key: 'DC-NORTH', value: 'v2' },
      { key: 'DC-SOUTH', value: 'v2' }, { key: 'DC-NORTH', value: 'v3' },
    ] });
    await sleep(300);
    // Lands in a new segment, closing the first one; only closed segments are compacted.
    await producer.send({ topic, acks: -1, messages: [{ key: 'DC-COAST', value: 'v1' }] });
    await producer.disconnect();

    // Offsets 0-4 hold the first batch; compaction keeps the last per key: DC-SOUTH v2 (3), DC-NORTH v3 (4),
    // and the active segment's DC-COAST v1 (5). The cleaner runs every log.cleaner.backoff.ms (0.5 s on the
    // jar broker, 15 s by default elsewhere), hence the polling.
    const expected = [['3', 'DC-SOUTH', 'v2'], ['4', 'DC-NORTH', 'v3'], ['5', 'DC-COAST', 'v1']];
    let seen: string[][] = [];
    for (const deadline = performance.now() + 90_000; performance.now() < deadline; await sleep(500)) {
      const got = await consumeUntil({ topic, until: (r) => r.at(-1)?.offset === '5' });
      seen = got.map((r) => [r.offset, r.key ?? '', r.value ?? '']);
      if (seen.length === expected.length) break;
    }
    expect(seen).toEqual(expected);
  });

  it('deletes topics so that they are no longer listed', async () => {
    const topic = uniqueTopic('smoke-delete');
    await admin.createTopics({ waitForLeaders: true, topics: [{ topic, numPartitions: 1, replicationFactor: 1 }] });
    expect(await admin.listTopics()).toContain(topic);
    await admin.deleteTopics({ topics: [topic], timeout: 10_000 });
    let listed = true;
    for (const deadline = performance.now() + 15_000; listed && performance.now() < deadline; await sleep(200)) {
      listed = (await admin.listTopics()).includes(topic);
    }
    expect(listed).toBe(false);
  });

  describe.skipIf(brokerControlUnavailable() !== undefined)('when the test drives the broker', () => {
    it('keeps committed records and group offsets across a restart, on the same address', async () => {
      const topic = uniqueTopic('smoke-restart');
      await admin.createTopics({ waitForLeaders: true, topics: [{ topic, numPartitions: 1, replicationFactor: 1 }] });
      const producer = client.producer({ allowAutoTopicCreation: false });
      await producer.connect();
      await producer.send({ topic, acks: -1, messages: ['r1', 'r2', 'r3'].map((value) => ({ key: 'k', value })) });
      await producer.disconnect();
      const groupId = uniqueName('smoke-restart-group');
      await consumeUntil({ topic, groupId, until: (r) => r.length >= 3 });
      expect(await committedOffset(groupId, topic)).toBe('3');
      const before = brokerPid();

      await restartBroker();

      expect(brokerPid()).not.toBe(before);
      // A new client on the same bootstrap address reaches the restarted broker and finds everything.
      const again = await consumeUntil({ client: kafka(), topic, until: (r) => r.length >= 3 });
      expect(values(again)).toEqual(['r1', 'r2', 'r3']);
      expect(await committedOffset(groupId, topic)).toBe('3');
    });

    it('keeps acknowledged records after a SIGKILL once the broker is started again', async () => {
      const topic = uniqueTopic('smoke-kill');
      await admin.createTopics({ waitForLeaders: true, topics: [{ topic, numPartitions: 1, replicationFactor: 1 }] });
      const producer = client.producer({ allowAutoTopicCreation: false });
      await producer.connect();
      await producer.send({ topic, acks: -1, messages: [{ key: 'k', value: 'before-kill' }] });
      await producer.disconnect();

      await killBroker();
      expect(brokerPid()).toBeUndefined();
      await startAgain();

      // A killed process loses nothing the OS already had (Kafka leaves flushing to the page cache).
      const got = await consumeUntil({ client: kafka(), topic, until: (r) => r.length >= 1 });
      expect(values(got)).toEqual(['before-kill']);
    });
  });
});
