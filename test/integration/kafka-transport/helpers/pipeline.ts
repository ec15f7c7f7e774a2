import type { Config } from '../../../../src/config/config.ts';
import type { LocationModelFactory } from '../../../../src/runtime/location-model-port.ts';
import type { KafkaPort, OutgoingMessage } from '../../../../src/transport/kafka/kafka-port.ts';
import { kafkaGroupIds, serveKafka, type KafkaService } from '../../../../src/transport/kafka/serve-kafka.ts';
import { produce, readAll, testLogger } from './harness.ts';
import type { RawInput } from './scenario.ts';
import { groupCaughtUp, waitFor } from './wait.ts';

// Both stages in this process, fed through the input topics as a source system would feed them.

export function inputMessages(config: Config, inputs: readonly RawInput[]): OutgoingMessage[] {
  return inputs.map((i) => ({ topic: config.topics[i.role], key: i.key, value: i.value }));
}

export async function startPipeline(config: Config, port: KafkaPort, models: LocationModelFactory): Promise<KafkaService> {
  // These tests replay a recorded history within minutes: wall-clock deadline closes and feed checks would not belong
  // to it (today's deadline would close every day since the history's last). live-clock.test.ts covers the clock.
  return serveKafka(config, testLogger(config), { models, handleSignals: false, setUpTopics: false, port, clock: false });
}

export async function waitIngested(port: KafkaPort, config: Config, roles: readonly RawInput['role'][]): Promise<void> {
  const group = kafkaGroupIds(config).ingest;
  for (const role of new Set(roles)) {
    await waitFor(`the ingest group to reach the end of ${config.topics[role]}`, () => groupCaughtUp(port, group, config.topics[role]));
  }
}

/** Once ingest is done: waits until the sensing stage committed past the last record of every event-log partition. */
export async function waitSensed(port: KafkaPort, config: Config): Promise<void> {
  const dataEnds = new Map<number, bigint>();
  for (const m of await readAll(port, config.topics.events)) dataEnds.set(m.partition, BigInt(m.offset) + 1n);
  await waitFor('the sensing group to reach the end of the event log', () => groupCaughtUp(port, kafkaGroupIds(config).sensing, config.topics.events, dataEnds));
}

/**
 * Master data first (so no order names a centre the sensing stage does not know yet), then the rest in waves of at
 * most `wave` records, each ingested before the next is sent. Records of different input topics are interleaved in
 * the event log by whichever ingest batch commits first, and waves keep that shuffle within a wave, as a live feed
 * would. A run of day-closed records always travels in a wave of its own: a close overtaking the day's last lines,
 * or the next day's lines overtaking the close, would change what the close counts, and so make the outputs (not
 * their equality between transports) depend on the broker's timing.
 */
export async function feed(port: KafkaPort, config: Config, inputs: readonly RawInput[], wave = Number.MAX_SAFE_INTEGER): Promise<void> {
  const master = inputs.filter((i) => i.role === 'locations');
  await produce(port, inputMessages(config, master));
  await waitIngested(port, config, ['locations']);
  for (const part of waves(inputs.filter((i) => i.role !== 'locations'), wave)) {
    await produce(port, inputMessages(config, part));
    await waitIngested(port, config, part.map((r) => r.role));
  }
  await waitSensed(port, config);
}

/** Splits the inputs, in order, into waves of at most `size`, cut wherever a run of day closes starts or ends. */
export function waves(inputs: readonly RawInput[], size: number): RawInput[][] {
  const out: RawInput[][] = [];
  let current: RawInput[] = [];
  for (const input of inputs) {
    const last = current.at(-1);
    if (current.length >= size || (last && (last.role === 'dayCloses') !== (input.role === 'dayCloses'))) {
      out.push(current);
      current = [];
    }
    current.push(input);
  }
  if (current.length > 0) out.push(current);
  return out;
}
