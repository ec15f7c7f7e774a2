import { z } from 'zod';

// Topic names: `v1` is the record's schema major version (DESIGN section 6).
export const DEFAULT_TOPICS = {
  orders: 'nearcast.orders.v1',
  shipments: 'nearcast.shipments.v1',
  baselines: 'nearcast.baselines.v1',
  dayCloses: 'nearcast.day-closes.v1',
  locations: 'nearcast.locations.v1',
  events: 'nearcast.internal.events.v1',
  changelog: 'nearcast.internal.changelog.v1',
  commands: 'nearcast.internal.commands.v1',
  plans: 'nearcast.plans.v1',
  alerts: 'nearcast.alerts.v1',
  accuracy: 'nearcast.accuracy.v1',
  deadLetter: 'nearcast.dead-letter.v1',
} as const;

const topicName = z
  .string()
  .min(1)
  .max(249)
  .regex(/^[A-Za-z0-9._-]+$/, { error: 'must be a Kafka topic name (letters, digits, . _ -)' });

export const topicsSchema = z
  .object(Object.fromEntries(Object.entries(DEFAULT_TOPICS).map(([k, v]) => [k, topicName.default(v)])) as {
    [K in keyof typeof DEFAULT_TOPICS]: z.ZodDefault<typeof topicName>;
  })
  .default(DEFAULT_TOPICS);

export type Topics = z.infer<typeof topicsSchema>;
