import { z } from 'zod';
import { identifier } from './primitives.ts';

// Branded so a location id cannot be passed where an item id is expected.
export const locationId = identifier.brand<'LocationId'>();
export const itemId = identifier.brand<'ItemId'>();
export type LocationId = z.infer<typeof locationId>;
export type ItemId = z.infer<typeof itemId>;

/** A series is one (location, item) pair; its key is also the Kafka key of its plan record. */
export type SeriesKey = `${string}|${string}`;
export function seriesKey(location: string, item: string): SeriesKey {
  return `${location}|${item}`;
}
