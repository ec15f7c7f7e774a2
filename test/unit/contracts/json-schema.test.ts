import { Ajv2020 } from 'ajv/dist/2020.js';
import { describe, expect, it } from 'vitest';
import { jsonSchemas, schemaFileName } from '../../../src/contracts/json-schema.ts';
import { INPUT_TYPES, OUTPUT_SCHEMAS } from '../../../src/contracts/records.ts';
import { staleSchemaFiles } from '../../../src/cli/schemas-command.ts';
import { goodBaseline, goodDayClosed, goodLocation, goodOrderLine, goodShipment } from './samples.ts';

describe('JSON Schemas in schemas/', () => {
  it('are current with the zod contracts (run `npm run schemas` after changing a contract)', () => {
    expect(staleSchemaFiles('schemas')).toEqual([]);
  });

  it('hold one file per record type', () => {
    const names = [...jsonSchemas().keys()].sort();
    const types = [...INPUT_TYPES, ...Object.keys(OUTPUT_SCHEMAS)].map((t) => schemaFileName(t as never)).sort();
    expect(names).toEqual(types);
  });

  it('compile under a standard JSON Schema 2020-12 validator and accept valid records', () => {
    const ajv = new Ajv2020({ strict: false, allErrors: true });
    const docs = jsonSchemas();
    const samples: Record<string, unknown> = {
      'order-line': goodOrderLine,
      shipment: goodShipment,
      'baseline-version': goodBaseline,
      'day-closed': goodDayClosed,
      location: goodLocation,
    };
    for (const [type, sample] of Object.entries(samples)) {
      const validate = ajv.compile(docs.get(schemaFileName(type as never))!);
      expect(validate(sample), JSON.stringify(validate.errors)).toBe(true);
    }
  });

  it('reject a record the contract rejects for a reason JSON Schema can state', () => {
    const ajv = new Ajv2020({ strict: false });
    const validate = ajv.compile(jsonSchemas().get(schemaFileName('shipment'))!);
    expect(validate({ ...goodShipment, shipmentId: 'has space' })).toBe(false);
    expect(validate({ ...goodShipment, location: undefined })).toBe(false);
  });
});
