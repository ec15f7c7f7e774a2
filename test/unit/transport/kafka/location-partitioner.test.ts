import { describe, expect, it } from 'vitest';
import { createLocationPartitioner, locationPartition, partitionKeyOf } from '../../../../src/transport/kafka/location-partitioner.ts';

const metadata = (n: number) => Array.from({ length: n }, (_, i) => ({ partitionErrorCode: 0, partitionId: i, leader: 1, replicas: [1], isr: [1], offlineReplicas: [] }));

describe('the location partitioner', () => {
  it('takes the location from the key: before the first bar, or the whole key', () => {
    expect(partitionKeyOf('DC-NORTH|SPARK-LEMON-330')).toBe('DC-NORTH');
    expect(partitionKeyOf('DC-NORTH|#manifest')).toBe('DC-NORTH');
    expect(partitionKeyOf('DC-NORTH')).toBe('DC-NORTH');
  });

  it('puts a location, its plans, its manifest and its alerts on the same partition', () => {
    const p = locationPartition('DC-COAST', 6);
    for (const key of ['DC-COAST|COLA-1L', 'DC-COAST|#manifest', 'DC-COAST|COLA-1L|spike|2026-03-04']) expect(locationPartition(key, 6)).toBe(p);
  });

  it('uses FNV-1a 32 of the location modulo the partition count', () => {
    // FNV-1a 32 of "a" is 0xe40c292c = 3826002220 (published test vector of the FNV reference); 3826002220 mod 6 = 4.
    expect(locationPartition('a', 6)).toBe(4);
  });

  it('as a kafkajs partitioner, honours an explicit partition and refuses an unkeyed message', () => {
    const partition = createLocationPartitioner();
    expect(partition({ topic: 't', partitionMetadata: metadata(6), message: { key: 'a|x', value: 'v' } })).toBe(4);
    expect(partition({ topic: 't', partitionMetadata: metadata(6), message: { key: 'a', value: 'v', partition: 1 } })).toBe(1);
    expect(() => partition({ topic: 't', partitionMetadata: metadata(6), message: { value: 'v' } })).toThrow(/without a key/);
  });
});
