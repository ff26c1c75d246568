// The address a request came from, for throttles: the socket peer, or — when the peer is a proxy named in
// TRUSTED_PROXIES — the hop that proxy saw. X-Forwarded-For is read only from the right and only past trusted hops,
// so a client cannot choose its own address by sending the header.
import { BlockList, isIP } from 'node:net';
import { config } from './config';

/** Set on each Request by the server boot (src/lib/server/boot.ts): the TCP peer's address. */
export const PEER_ADDRESS = Symbol.for('tidemark.peerAddress');

/** Strips the IPv4-mapped IPv6 prefix so `::ffff:10.0.0.1` and `10.0.0.1` are one address. */
const normal = (a: string) => a.trim().replace(/^::ffff:(?=\d+\.\d+\.\d+\.\d+$)/i, '');

/** Parses TRUSTED_PROXIES: comma-separated addresses or CIDR ranges (`10.0.0.0/8`, `::1`, `loopback`). */
export function trustedProxyList(spec: string): BlockList {
  const list = new BlockList();
  for (const raw of spec.split(',').map((s) => s.trim()).filter(Boolean)) {
    if (raw === 'loopback') {
      list.addSubnet('127.0.0.0', 8, 'ipv4');
      list.addAddress('::1', 'ipv6');
      continue;
    }
    const [addr, bits] = raw.split('/');
    const family = isIP(addr);
    if (!family) throw new Error(`TRUSTED_PROXIES: "${raw}" is not an address or CIDR range`);
    const type = family === 4 ? 'ipv4' : 'ipv6';
    if (bits === undefined) list.addAddress(addr, type);
    else list.addSubnet(addr, Number(bits), type);
  }
  return list;
}

const isTrusted = (list: BlockList, addr: string) => {
  const family = isIP(addr);
  return family !== 0 && list.check(addr, family === 4 ? 'ipv4' : 'ipv6');
};

/**
 * Returns the client's address: starting from the socket peer, each hop that is a trusted proxy hands over to the
 * entry it appended to X-Forwarded-For (the rightmost one left). The first untrusted hop is the client. With no
 * peer known (a header but no socket address, as under the dev server) the header is not trusted: "unknown".
 */
export function resolveClientAddress(peer: string | undefined, forwardedFor: string | null, trusted: BlockList): string {
  if (!peer) return 'unknown';
  let current = normal(peer);
  const hops = (forwardedFor ?? '').split(',').map(normal).filter(Boolean);
  while (isTrusted(trusted, current) && hops.length) current = hops.pop()!;
  return current;
}

let cached: { spec: string; list: BlockList } | undefined;

/** The client address of an Astro request (see resolveClientAddress). */
export function clientAddressOf(request: Request, astroClientAddress?: string): string {
  const spec = config.trustedProxies;
  if (!cached || cached.spec !== spec) cached = { spec, list: trustedProxyList(spec) };
  const peer = (Reflect.get(request, PEER_ADDRESS) as string | undefined) ?? (request.headers.has('x-forwarded-for') ? undefined : astroClientAddress);
  return resolveClientAddress(peer, request.headers.get('x-forwarded-for'), cached.list);
}
