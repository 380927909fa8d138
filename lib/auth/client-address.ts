import type { IncomingMessage } from 'node:http';
import { isIPv6 } from 'node:net';

/**
 * Next.js hands route handlers no socket, only headers, and fills X-Forwarded-For from the socket only when the
 * client sent none. So server.ts calls this on every request: without trusted proxies the header becomes the
 * connection's own address, whatever the client sent; with them it is left for `clientAddress` to read.
 */
export function pinClientAddress(req: IncomingMessage, trustedProxies: number): void {
  if (trustedProxies === 0) req.headers['x-forwarded-for'] = req.socket.remoteAddress ?? '';
}

type HeaderBag = Headers | Record<string, string | string[] | undefined>;

/**
 * The client's address as the sign-in limits count it. Each trusted proxy appends the address it saw, so the
 * client is the entry that many places from the right (with none, the one entry server.ts pinned). IPv4 mapped
 * into IPv6 is shown as IPv4; an IPv6 address counts by its /64, which one home or shop is usually given whole.
 */
export function clientAddress(headers: HeaderBag | undefined, trustedProxies: number): string {
  const raw = headers instanceof Headers ? headers.get('x-forwarded-for') : headers?.['x-forwarded-for'];
  const entries = (Array.isArray(raw) ? raw.join(',') : (raw ?? ''))
    .split(',')
    .map((s) => s.trim())
    .filter(Boolean);
  const picked = entries[Math.max(0, entries.length - Math.max(trustedProxies, 1))];
  return picked ? normaliseAddress(picked) : 'unknown';
}

export function normaliseAddress(address: string): string {
  const a = address.trim().toLowerCase().replace(/^\[|\]$/g, '');
  const mapped = /^::ffff:(\d+\.\d+\.\d+\.\d+)$/.exec(a);
  if (mapped) return mapped[1]!;
  if (!isIPv6(a)) return a;
  return `${expandIPv6(a).slice(0, 4).join(':')}::/64`;
}

/** The eight groups of an IPv6 address, zero-padded (`::` filled in, a zone index dropped). */
function expandIPv6(address: string): string[] {
  const [head = '', tail] = address.split('%')[0]!.split('::');
  const left = head ? head.split(':') : [];
  const right = tail ? tail.split(':') : [];
  const groups = tail === undefined ? left : [...left, ...Array<string>(8 - left.length - right.length).fill('0'), ...right];
  return groups.map((g) => g.padStart(4, '0'));
}
