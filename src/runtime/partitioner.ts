// Our own partitioner: location → event-log partition. A stable hash (32-bit FNV-1a over the UTF-8 bytes of the
// location id) so every producer — ingest instances, the HTTP API, the deadline clock, the embedded transport —
// puts one location's records on one partition, independently of any client library's default partitioner.

const FNV_OFFSET = 0x811c9dc5;
const FNV_PRIME = 0x01000193;

export function fnv1a32(text: string): number {
  let hash = FNV_OFFSET;
  for (const byte of Buffer.from(text, 'utf8')) {
    hash ^= byte;
    hash = Math.imul(hash, FNV_PRIME) >>> 0;
  }
  return hash >>> 0;
}

export function partitionFor(location: string, partitions: number): number {
  if (!Number.isInteger(partitions) || partitions < 1) throw new RangeError(`partitions must be a positive whole number, got ${partitions}`);
  return fnv1a32(location) % partitions;
}
