import { lookup } from 'node:dns/promises';
import { BlockList, isIP } from 'node:net';
import { NearcastError } from '../errors.ts';

// Where a webhook may go. Targets come from configuration only, and still: https only, no credentials in the URL,
// and never an address inside the network (loopback, private, link-local, carrier-grade NAT, multicast, reserved),
// checked on every address the name resolves to at every delivery, so a name that later resolves inward (DNS
// rebinding) is refused too. One explicitly named host may be allowed for a test receiver.

const REFUSED = new BlockList();
for (const [net, prefix] of [
  ['0.0.0.0', 8], // "this network"
  ['10.0.0.0', 8], // private (RFC 1918)
  ['100.64.0.0', 10], // carrier-grade NAT (RFC 6598)
  ['127.0.0.0', 8], // loopback
  ['169.254.0.0', 16], // link-local, cloud metadata endpoints live here
  ['172.16.0.0', 12], // private
  ['192.0.0.0', 24], // IETF protocol assignments
  ['192.0.2.0', 24], // documentation
  ['192.168.0.0', 16], // private
  ['198.18.0.0', 15], // benchmarking
  ['198.51.100.0', 24], // documentation
  ['203.0.113.0', 24], // documentation
  ['224.0.0.0', 4], // multicast
  ['240.0.0.0', 4], // reserved, and the broadcast address
] as const) {
  REFUSED.addSubnet(net, prefix, 'ipv4');
}
for (const [net, prefix] of [
  ['::', 128], // unspecified
  ['::1', 128], // loopback
  ['64:ff9b::', 96], // NAT64: reaches IPv4 through a translator
  ['100::', 64], // discard
  ['2001:db8::', 32], // documentation
  ['fc00::', 7], // unique local
  ['fe80::', 10], // link-local
  ['fec0::', 10], // site-local (deprecated)
  ['ff00::', 8], // multicast
] as const) {
  REFUSED.addSubnet(net, prefix, 'ipv6');
}

export function isRefusedAddress(address: string): boolean {
  const family = isIP(address);
  if (family === 0) return true;
  // BlockList also matches IPv4-mapped IPv6 (::ffff:10.0.0.1) against the IPv4 ranges.
  return REFUSED.check(address, family === 4 ? 'ipv4' : 'ipv6');
}

export interface ResolvedAddress {
  readonly address: string;
  readonly family: 4 | 6;
}

export type Resolver = (hostname: string) => Promise<readonly ResolvedAddress[]>;

export const systemResolver: Resolver = async (hostname) =>
  (await lookup(hostname, { all: true, verbatim: true })).map((a) => ({ address: a.address, family: a.family === 6 ? 6 : 4 }));

export interface Target {
  readonly url: URL;
  /** The host name as written, without IPv6 brackets. */
  readonly hostname: string;
}

/** Checks what can be checked without the network; the message never repeats the URL (it may carry a token). */
export function parseTarget(raw: string): Target {
  let url: URL;
  try {
    url = new URL(raw);
  } catch {
    throw new NearcastError('NEARCAST_WEBHOOK_REFUSED', ['webhook.url: is not a valid URL']);
  }
  if (url.protocol !== 'https:') throw new NearcastError('NEARCAST_WEBHOOK_REFUSED', ['webhook.url: must use https']);
  if (url.username !== '' || url.password !== '') throw new NearcastError('NEARCAST_WEBHOOK_REFUSED', ['webhook.url: must not carry a user name or password']);
  const hostname = url.hostname.replace(/^\[(.*)\]$/, '$1');
  return { url, hostname };
}

/** Resolves the target and returns the address to connect to; refuses if any resolved address is inside the network. */
export async function vetTarget(target: Target, allowHost: string | undefined, resolve: Resolver): Promise<ResolvedAddress> {
  const literal = isIP(target.hostname);
  const addresses: readonly ResolvedAddress[] = literal !== 0 ? [{ address: target.hostname, family: literal === 6 ? 6 : 4 }] : await resolve(target.hostname);
  if (addresses.length === 0) throw new NearcastError('NEARCAST_WEBHOOK_REFUSED', ['webhook.url: the host name resolves to no address']);
  const allowed = allowHost !== undefined && allowHost !== '' && allowHost.toLowerCase() === target.hostname.toLowerCase();
  if (!allowed) {
    const inside = addresses.filter((a) => isRefusedAddress(a.address));
    if (inside.length > 0) {
      throw new NearcastError('NEARCAST_WEBHOOK_REFUSED', [
        `webhook.url: resolves to ${inside.map((a) => a.address).join(', ')}, inside a loopback, private, link-local or reserved range`,
      ]);
    }
  }
  return addresses[0]!;
}
