import { z } from 'zod';
import { locationId } from './ids.ts';
import { identifier, localDate } from './primitives.ts';

/** The source says a location's day is complete. */
export const dayClosedSchema = z.object({
  eventId: identifier,
  location: locationId,
  date: localDate,
});

export type DayClosed = z.infer<typeof dayClosedSchema>;
