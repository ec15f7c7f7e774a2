/**
 * The UTF-8 text of raw record bytes (or the text itself). A view on the same memory is decoded: `Buffer.from(bytes)`
 * would first copy every record's bytes, which for a Kafka batch is all of it.
 */
export function utf8Text(value: string | Uint8Array): string {
  if (typeof value === 'string') return value;
  return (Buffer.isBuffer(value) ? value : Buffer.from(value.buffer, value.byteOffset, value.byteLength)).toString('utf8');
}
