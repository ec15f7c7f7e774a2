import { z } from 'zod';
import { INPUT_TYPES, OUTPUT_SCHEMAS, inputSchemas, type InputType, type OutputType } from './records.ts';

// JSON Schema (2020-12) documents generated from the zod schemas, so the schema a consumer validates against and
// the check nearcast runs are one thing. Refinements that JSON Schema cannot state (calendar validity, time-zone
// existence, cross-field rules) are enforced by nearcast and described in each document's `description`.

export const SCHEMA_BASE_URI = 'https://nearcast.invalid/schemas/';

export function schemaFileName(type: InputType | OutputType): string {
  return `${type}.v1.schema.json`;
}

export function jsonSchemas(): Map<string, Record<string, unknown>> {
  const inputs = inputSchemas();
  const all: Array<[InputType | OutputType, z.ZodType, string]> = [
    ...INPUT_TYPES.map((t) => [t, inputs[t] as z.ZodType, `nearcast input record: ${t}`] as [InputType, z.ZodType, string]),
    ...(Object.keys(OUTPUT_SCHEMAS) as OutputType[]).map(
      (t) => [t, OUTPUT_SCHEMAS[t] as z.ZodType, `nearcast output record: ${t}`] as [OutputType, z.ZodType, string],
    ),
  ];
  const out = new Map<string, Record<string, unknown>>();
  for (const [type, schema, title] of all) {
    const doc = z.toJSONSchema(schema, { target: 'draft-2020-12', unrepresentable: 'any', io: 'input' }) as Record<string, unknown>;
    out.set(schemaFileName(type), {
      $schema: 'https://json-schema.org/draft/2020-12/schema',
      $id: `${SCHEMA_BASE_URI}${schemaFileName(type)}`,
      title,
      description:
        'Generated from nearcast\'s zod contracts (npm run schemas). nearcast additionally enforces real calendar dates, existing IANA time zones, configured quantity and time bounds and cross-field rules.',
      ...doc,
    });
  }
  return out;
}
