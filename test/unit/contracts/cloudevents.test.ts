import { describe, expect, it } from 'vitest';
import {
  cloudEvent,
  deterministicId,
  fromKafkaBinary,
  toKafkaBinary,
  toStructured,
} from '../../../src/contracts/cloudevents.ts';

// Checks against the CloudEvents 1.0 specification (cloudevents/spec v1.0.2: spec.md "Required Attributes" id,
// source, specversion, type; "Optional Attributes" datacontenttype, dataschema, subject, time), its Kafka protocol
// binding (kafka-protocol-binding.md §3.2: binary mode maps each attribute to a header named `ce_<attribute>`,
// datacontenttype to `content-type`) and its JSON format (json-format.md: media type application/cloudevents+json).

const plan = { location: 'DC-NORTH', item: 'COLA-1L', planDate: '2026-03-05', revision: 1 };
const event = cloudEvent(
  {
    id: deterministicId('DC-NORTH', 'COLA-1L', '2026-03-05', 1),
    source: '/nearcast/DC-NORTH',
    type: 'io.nearcast.plan.v1',
    time: '2026-03-05T23:30:00Z',
    subject: 'DC-NORTH|COLA-1L',
  },
  plan,
);

describe('CloudEvents 1.0 envelope', () => {
  it('carries the four required attributes with specversion 1.0', () => {
    expect(event.specversion).toBe('1.0');
    expect(event.id).toMatch(/^[0-9a-f]{32}$/);
    expect(event.source).toBe('/nearcast/DC-NORTH');
    expect(event.type).toBe('io.nearcast.plan.v1');
  });

  it('refuses an event without a required attribute', () => {
    expect(() => cloudEvent({ id: '', source: '/x', type: 't' }, {})).toThrow(/id/);
    expect(() => cloudEvent({ id: 'a', source: '', type: 't' }, {})).toThrow(/source/);
    expect(() => cloudEvent({ id: 'a', source: '/x', type: '' }, {})).toThrow(/type/);
  });

  it('gives the same id to the same logical record and a different id to the next revision', () => {
    expect(deterministicId('DC-NORTH', 'COLA-1L', '2026-03-05', 1)).toBe(event.id);
    expect(deterministicId('DC-NORTH', 'COLA-1L', '2026-03-05', 2)).not.toBe(event.id);
    // Parts are separated, so ("ab","c") and ("a","bc") do not collide.
    expect(deterministicId('ab', 'c')).not.toBe(deterministicId('a', 'bc'));
  });

  it('maps attributes to ce_ headers in Kafka binary mode and the data to the value', () => {
    const { headers, value } = toKafkaBinary(event);
    expect(headers).toEqual({
      ce_specversion: '1.0',
      ce_id: event.id,
      ce_source: '/nearcast/DC-NORTH',
      ce_type: 'io.nearcast.plan.v1',
      ce_time: '2026-03-05T23:30:00Z',
      ce_subject: 'DC-NORTH|COLA-1L',
      'content-type': 'application/json',
    });
    expect(JSON.parse(value)).toEqual(plan);
  });

  it('leaves absent optional attributes out of the headers', () => {
    const bare = toKafkaBinary(cloudEvent({ id: 'x', source: '/s', type: 't' }, 1)).headers;
    expect(Object.keys(bare).sort()).toEqual(['ce_id', 'ce_source', 'ce_specversion', 'ce_type', 'content-type']);
  });

  it('reads back what it writes, from Buffer headers as Kafka clients deliver them', () => {
    const { headers, value } = toKafkaBinary(event);
    const buffers = Object.fromEntries(Object.entries(headers).map(([k, v]) => [k, Buffer.from(v)]));
    expect(fromKafkaBinary(buffers, Buffer.from(value))).toEqual(event);
  });

  it('rejects a message that is not CloudEvents 1.0', () => {
    expect(() => fromKafkaBinary({ ce_specversion: '0.3' }, '{}')).toThrow(/1.0/);
  });

  it('uses the structured JSON format over HTTP', () => {
    const { contentType, body } = toStructured(event);
    expect(contentType).toBe('application/cloudevents+json');
    const parsed = JSON.parse(body);
    expect(parsed).toMatchObject({ specversion: '1.0', id: event.id, type: 'io.nearcast.plan.v1', datacontenttype: 'application/json' });
    expect(parsed.data).toEqual(plan);
  });
});
