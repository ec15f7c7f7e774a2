import { createHash } from 'node:crypto';

// CloudEvents 1.0 (https://github.com/cloudevents/spec/blob/v1.0.2/cloudevents/spec.md) with the Kafka protocol
// binding (kafka-protocol-binding.md, binary content mode: attributes as `ce_`-prefixed headers) and the JSON
// event format (json-format.md, structured content mode over HTTP).

export const SPEC_VERSION = '1.0';
export const JSON_CONTENT_TYPE = 'application/json';
export const STRUCTURED_CONTENT_TYPE = 'application/cloudevents+json';

export interface CloudEventAttributes {
  readonly id: string;
  readonly source: string;
  readonly type: string;
  readonly time?: string;
  readonly subject?: string;
  readonly datacontenttype?: string;
  readonly dataschema?: string;
}

export interface CloudEvent<T> extends CloudEventAttributes {
  readonly specversion: typeof SPEC_VERSION;
  readonly data: T;
}

/**
 * Deterministic event id: the same logical output (same location, item, plan date, revision) always gets the same
 * id, so a consumer de-duplicates replays by (source, id) as the specification intends.
 */
export function deterministicId(...parts: readonly (string | number)[]): string {
  return createHash('sha256').update(parts.map(String).join('\u001f')).digest('hex').slice(0, 32);
}

export function cloudEvent<T>(attributes: CloudEventAttributes, data: T): CloudEvent<T> {
  for (const key of ['id', 'source', 'type'] as const) {
    if (!attributes[key]) throw new TypeError(`CloudEvents attribute ${key} must be a non-empty string`);
  }
  return { specversion: SPEC_VERSION, datacontenttype: JSON_CONTENT_TYPE, ...attributes, data };
}

export type Headers = Record<string, string>;

/** Binary content mode over Kafka: data is the message value, attributes travel as headers. `value` is the data's JSON text when the caller has it already. */
export function toKafkaBinary<T>(event: CloudEvent<T>, value: string = JSON.stringify(event.data)): { headers: Headers; value: string } {
  const headers: Headers = {
    ce_specversion: event.specversion,
    ce_id: event.id,
    ce_source: event.source,
    ce_type: event.type,
    'content-type': event.datacontenttype ?? JSON_CONTENT_TYPE,
  };
  if (event.time !== undefined) headers.ce_time = event.time;
  if (event.subject !== undefined) headers.ce_subject = event.subject;
  if (event.dataschema !== undefined) headers.ce_dataschema = event.dataschema;
  return { headers, value };
}

export function fromKafkaBinary<T = unknown>(headers: Record<string, string | Buffer | undefined>, value: string | Buffer): CloudEvent<T> {
  const h = (k: string): string | undefined => {
    const v = headers[k];
    return v === undefined ? undefined : v.toString();
  };
  const specversion = h('ce_specversion');
  if (specversion !== SPEC_VERSION) throw new TypeError(`not a CloudEvents ${SPEC_VERSION} message (ce_specversion=${specversion ?? 'missing'})`);
  const optional = (k: string) => {
    const v = h(k);
    return v === undefined ? {} : { [k.slice(3)]: v };
  };
  return {
    specversion: SPEC_VERSION,
    id: h('ce_id') ?? '',
    source: h('ce_source') ?? '',
    type: h('ce_type') ?? '',
    datacontenttype: h('content-type') ?? JSON_CONTENT_TYPE,
    ...optional('ce_time'),
    ...optional('ce_subject'),
    ...optional('ce_dataschema'),
    data: JSON.parse(value.toString()) as T,
  };
}

/** Structured content mode over HTTP: the whole event is the JSON body. */
export function toStructured<T>(event: CloudEvent<T>): { contentType: string; body: string } {
  return { contentType: STRUCTURED_CONTENT_TYPE, body: JSON.stringify(event) };
}
