import type { z } from 'zod';
import { accuracySummarySchema } from './accuracy-summary.ts';
import { alertSchema } from './alert.ts';
import { baselineVersionSchema } from './baseline-version.ts';
import { dayClosedSchema } from './day-closed.ts';
import { locationSchema } from './location.ts';
import { manifestSchema } from './manifest.ts';
import { orderLineSchema } from './order-line.ts';
import { planSchema } from './plan.ts';
import { DEFAULT_INPUT_LIMITS, type InputLimits } from './primitives.ts';
import { replanEntrySchema } from './replan-entry.ts';
import { shipmentSchema } from './shipment.ts';

export const INPUT_TYPES = ['order-line', 'shipment', 'baseline-version', 'day-closed', 'location'] as const;
export type InputType = (typeof INPUT_TYPES)[number];

export function inputSchemas(limits: InputLimits = DEFAULT_INPUT_LIMITS) {
  return {
    'order-line': orderLineSchema(limits),
    shipment: shipmentSchema(limits),
    'baseline-version': baselineVersionSchema(limits),
    'day-closed': dayClosedSchema,
    location: locationSchema,
  } as const;
}

export type InputSchemas = ReturnType<typeof inputSchemas>;
export type InputRecord<T extends InputType> = z.infer<InputSchemas[T]>;

export const OUTPUT_SCHEMAS = {
  plan: planSchema,
  manifest: manifestSchema,
  alert: alertSchema,
  'replan-entry': replanEntrySchema,
  'accuracy-summary': accuracySummarySchema,
} as const;
export type OutputType = keyof typeof OUTPUT_SCHEMAS;

/** CloudEvents `type` of each record, reverse-DNS as the specification recommends. */
export const EVENT_TYPES: Record<InputType | OutputType, string> = {
  'order-line': 'io.nearcast.order-line.v1',
  shipment: 'io.nearcast.shipment.v1',
  'baseline-version': 'io.nearcast.baseline-version.v1',
  'day-closed': 'io.nearcast.day-closed.v1',
  location: 'io.nearcast.location.v1',
  plan: 'io.nearcast.plan.v1',
  manifest: 'io.nearcast.manifest.v1',
  alert: 'io.nearcast.alert.v1',
  'replan-entry': 'io.nearcast.replan-entry.v1',
  'accuracy-summary': 'io.nearcast.accuracy-summary.v1',
};
