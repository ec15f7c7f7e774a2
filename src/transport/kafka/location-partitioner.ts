import type { ICustomPartitioner, PartitionerArgs } from 'kafkajs';
import { partitionFor } from '../../runtime/partitioner.ts';

// Every nearcast topic is partitioned by location with the runtime's own hash, so the event log, the changelog and
// the outputs of one location share a partition number and no client library's default partitioner decides it.
// Keys are `location` (event log) or `location|...` (plans, manifests, alerts, accuracy): the location is the part
// before the first `|`.

export function partitionKeyOf(key: string): string {
  const bar = key.indexOf('|');
  return bar < 0 ? key : key.slice(0, bar);
}

export function locationPartition(key: string, partitions: number): number {
  return partitionFor(partitionKeyOf(key), partitions);
}

/** kafkajs `createPartitioner`: an explicit message partition wins; otherwise the key's location decides. */
export const createLocationPartitioner: ICustomPartitioner = () => {
  return ({ partitionMetadata, message }: PartitionerArgs): number => {
    if (message.partition !== undefined && message.partition !== null) return message.partition;
    if (message.key === undefined || message.key === null) {
      throw new TypeError('nearcast writes keyed messages only; a message without a key cannot be partitioned by location');
    }
    return locationPartition(message.key.toString(), partitionMetadata.length);
  };
};
