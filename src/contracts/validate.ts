import type { z } from 'zod';
import type { ErrorCode } from '../errors.ts';
import { inputSchemas, type InputRecord, type InputSchemas, type InputType } from './records.ts';
import { DEFAULT_INPUT_LIMITS, type InputLimits } from './primitives.ts';
import { fastOrderLineCheck, fastShipmentCheck, type FastCheck } from './record-fast-checks.ts';
import { utf8Text } from './utf8-text.ts';

export interface Issue {
  /** Dotted field path, e.g. `weeks.3.quantity`; empty for the record as a whole. */
  readonly path: string;
  readonly message: string;
}

export type Validation<T> =
  | { readonly ok: true; readonly value: T }
  | { readonly ok: false; readonly code: ErrorCode; readonly issues: readonly Issue[] };

export const MAX_JSON_DEPTH = 8;
export const MAX_RECORD_BYTES = 1_048_576; // 1 MiB

/** One readable line for logs, dead-letter reasons and HTTP problem details. */
export function describeIssues(issues: readonly Issue[]): string {
  return issues.map((i) => (i.path ? `${i.path}: ${i.message}` : i.message)).join('; ');
}

export function jsonDepth(value: unknown, limit = MAX_JSON_DEPTH + 1): number {
  // Stops descending once past the limit, so a hostile record cannot blow the stack; called on every record, so
  // it walks with for...in rather than allocating an array of children per object.
  return depthOf(value, 0, limit);
}

function depthOf(value: unknown, above: number, limit: number): number {
  if (value === null || typeof value !== 'object') return above;
  const depth = above + 1;
  if (depth > limit) return depth;
  let max = depth;
  const object = value as Record<string, unknown>;
  for (const key in object) {
    if (!Object.hasOwn(object, key)) continue;
    const child = object[key];
    if (child === null || typeof child !== 'object') continue;
    const d = depthOf(child, depth, limit);
    if (d > max) max = d;
    if (max > limit) return max;
  }
  return max;
}

function fromZod(error: z.ZodError): Issue[] {
  return error.issues.map((i) => ({
    path: i.path.map(String).join('.'),
    // Messages are our own wording; zod's defaults are replaced where they would echo input.
    message: i.code === 'invalid_type' && i.message.startsWith('Invalid input') ? `must be ${i.expected}` : i.message,
  }));
}

export class RecordValidator {
  private readonly schemas: InputSchemas;
  /** Plain-code checks of the high-volume types for records that pass; the schema judges whatever they leave. */
  private readonly fast: Partial<Record<InputType, FastCheck<unknown>>>;

  constructor(limits: InputLimits = DEFAULT_INPUT_LIMITS) {
    this.schemas = inputSchemas(limits);
    this.fast = { 'order-line': fastOrderLineCheck(limits), shipment: fastShipmentCheck(limits) };
  }

  /** Validates an already-parsed value. */
  check<T extends InputType>(type: T, value: unknown): Validation<InputRecord<T>> {
    if (jsonDepth(value) > MAX_JSON_DEPTH) {
      return { ok: false, code: 'NEARCAST_INPUT_TOO_DEEP', issues: [{ path: '', message: `nests deeper than ${MAX_JSON_DEPTH} levels` }] };
    }
    if (value === null || typeof value !== 'object' || Array.isArray(value)) {
      return { ok: false, code: 'NEARCAST_INPUT_INVALID', issues: [{ path: '', message: 'must be a JSON object' }] };
    }
    const fast = this.fast[type]?.(value as Record<string, unknown>);
    if (fast !== undefined) return { ok: true, value: fast as InputRecord<T> };
    const parsed = this.schemas[type].safeParse(value);
    if (parsed.success) return { ok: true, value: parsed.data as InputRecord<T> };
    return { ok: false, code: 'NEARCAST_INPUT_INVALID', issues: fromZod(parsed.error) };
  }

  /** Validates raw bytes or text as they come off a topic, a file line or an HTTP body. */
  parse<T extends InputType>(type: T, raw: string | Uint8Array): Validation<InputRecord<T>> {
    const text = utf8Text(raw);
    // A UTF-16 unit takes at most 3 UTF-8 bytes: most records need no byte count.
    if (text.length * 3 > MAX_RECORD_BYTES && Buffer.byteLength(text, 'utf8') > MAX_RECORD_BYTES) {
      return { ok: false, code: 'NEARCAST_INPUT_TOO_LARGE', issues: [{ path: '', message: `is larger than ${MAX_RECORD_BYTES} bytes` }] };
    }
    let value: unknown;
    try {
      value = JSON.parse(text);
    } catch {
      // The parser's own message quotes the input; we never echo feed content into logs or dead letters.
      return { ok: false, code: 'NEARCAST_INPUT_MALFORMED_JSON', issues: [{ path: '', message: 'is not valid JSON' }] };
    }
    return this.check(type, value);
  }
}
