// 53-bit string hashes (exact in a double) for identities the state must remember compactly: order lines,
// shipments and event ids. Two independent 32-bit mixes (FNV-1a and a multiply-rotate) make collisions inside one
// series (at most some tens of thousands of keys) about 1 in 10^8 over the lifetime of a location.

export function hash53(text: string): number {
  let a = 0x811c9dc5;
  let b = 0x9e3779b9;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    a = Math.imul(a ^ c, 0x01000193);
    b = Math.imul(b ^ c, 0x85ebca6b);
    b = (b << 13) | (b >>> 19);
  }
  b = Math.imul(b ^ (b >>> 16), 0xc2b2ae35);
  b ^= b >>> 13;
  a ^= a >>> 15;
  return (b & 0x1fffff) * 4_294_967_296 + (a >>> 0);
}

/** Identity of an order line inside its series. */
export function lineKeyHash(orderId: string, lineId: string): number {
  return hash53(`${orderId}\u001f${lineId}`);
}
