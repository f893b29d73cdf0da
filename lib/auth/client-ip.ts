import { BlockList, isIP } from 'node:net';

/**
 * The header our own HTTP server (scripts/server.ts) sets on every request to the client address it
 * resolved; any value a client sends under this name is thrown away before the app sees the request.
 */
export const CLIENT_IP_HEADER = 'x-trenchbook-client-ip';

/** Forwarding headers that only a trusted proxy may set; dropped from requests that come from anyone else. */
export const FORWARDING_HEADERS = ['x-forwarded-for', 'x-real-ip', 'forwarded'] as const;

/**
 * Parses TRUSTED_PROXIES: comma-separated IP addresses or CIDR blocks (IPv4 or IPv6). Throws with the
 * offending entry when one is neither.
 *
 * @example parseProxyList('127.0.0.1, 10.0.0.0/8').check('10.1.2.3') // true
 */
export function parseProxyList(list: string): BlockList {
  const blocks = new BlockList();
  for (const raw of list.split(',')) {
    const entry = raw.trim();
    if (!entry) continue;
    const [address, bits, extra] = entry.split('/');
    const family = isIP(address);
    if (!family || extra !== undefined) throw new Error(`TRUSTED_PROXIES: "${entry}" is not an IP address or CIDR block`);
    const type = family === 6 ? 'ipv6' : 'ipv4';
    if (bits === undefined) {
      blocks.addAddress(address, type);
    } else {
      const prefix = Number(bits);
      if (!/^\d+$/.test(bits) || prefix > (family === 6 ? 128 : 32)) throw new Error(`TRUSTED_PROXIES: "${entry}" has a bad prefix length`);
      blocks.addSubnet(address, prefix, type);
    }
  }
  return blocks;
}

/** `::ffff:127.0.0.1` (an IPv4 client on a dual-stack socket) as `127.0.0.1`. */
function plainAddress(address: string): string {
  const a = address.trim();
  return a.toLowerCase().startsWith('::ffff:') && isIP(a.slice(7)) === 4 ? a.slice(7) : a;
}

/** Whether an address is one of the configured proxies. */
export function isTrusted(address: string, trusted: BlockList): boolean {
  const a = plainAddress(address);
  const family = isIP(a);
  return family !== 0 && trusted.check(a, family === 6 ? 'ipv6' : 'ipv4');
}

/**
 * The client address a request is counted under (sign-in limits): the socket's peer, unless that peer is a
 * configured proxy, in which case X-Forwarded-For is read from the right, skipping trusted proxies, and
 * the first address that is not one is the client. A client-supplied X-Forwarded-For is therefore never
 * believed, and clients without one are told apart by their own addresses.
 *
 * @example resolveClientIp('203.0.113.9', { 'x-forwarded-for': '1.2.3.4' }, parseProxyList('')) // '203.0.113.9'
 * @example resolveClientIp('10.0.0.2', { 'x-forwarded-for': '1.2.3.4, 198.51.100.7' }, parseProxyList('10.0.0.0/8')) // '198.51.100.7'
 */
export function resolveClientIp(
  socketAddress: string | undefined,
  headers: Record<string, string | string[] | undefined>,
  trusted: BlockList,
): string {
  const peer = socketAddress ? plainAddress(socketAddress) : 'unknown';
  if (!socketAddress || !isTrusted(peer, trusted)) return peer;
  const raw = headers['x-forwarded-for'];
  const hops = (Array.isArray(raw) ? raw.join(',') : raw ?? '')
    .split(',')
    .map((h) => plainAddress(h))
    .filter((h) => h !== '');
  for (let i = hops.length - 1; i >= 0; i--) {
    if (isIP(hops[i]) === 0) return peer; // a malformed hop: count the proxy, not a made-up address
    if (!isTrusted(hops[i], trusted)) return hops[i];
  }
  return hops[0] ?? peer;
}

let warned = false;

/**
 * The client address resolved by our server for this request. A request that did not pass through
 * scripts/server.ts (e.g. `next start` run by hand) has none; it counts as `unknown` and a warning says why.
 */
export function clientIp(headers: Record<string, string | string[] | undefined> | Headers): string {
  const value = headers instanceof Headers ? headers.get(CLIENT_IP_HEADER) : headers[CLIENT_IP_HEADER];
  const ip = (Array.isArray(value) ? value[0] : value)?.trim();
  if (ip) return ip;
  if (!warned) {
    warned = true;
    console.warn('[trenchbook] requests do not come through scripts/server.ts, so client addresses are unknown and sign-in limits per address are shared');
  }
  return 'unknown';
}
