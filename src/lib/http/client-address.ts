import { isIP } from 'node:net';

// Which address a request came from. Without a proxy in front, only the socket's address is true: any client
// can write X-Forwarded-For. Behind N proxies that each append the address they saw, the client is the entry
// the outermost trusted proxy appended, N places from the right of the chain that ends with the socket.

/** Headers that name the client or the original request; stripped when no proxy is trusted. */
export const FORWARDED_HEADERS = [
  'x-forwarded-for',
  'x-forwarded-host',
  'x-forwarded-proto',
  'x-forwarded-port',
  'forwarded',
  'x-real-ip',
] as const;

/** A valid IP address in its plain form (IPv4-mapped IPv6 as IPv4), or null. */
export function normaliseIp(value: string | undefined | null): string | null {
  if (!value) return null;
  const trimmed = value.trim();
  const plain = trimmed.startsWith('::ffff:') && isIP(trimmed.slice(7)) === 4 ? trimmed.slice(7) : trimmed;
  return isIP(plain) ? plain.toLowerCase() : null;
}

/** The client's address for a request: the socket's with no trusted proxy, else the one the outermost trusted proxy appended. */
export function resolveClientAddress(
  socketAddress: string | undefined,
  forwardedFor: string | string[] | undefined,
  trustedProxies: number,
): string | null {
  const socket = normaliseIp(socketAddress);
  if (trustedProxies <= 0) return socket;
  const chain = (Array.isArray(forwardedFor) ? forwardedFor.join(',') : (forwardedFor ?? ''))
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s !== '');
  const hops = [...chain, socket ?? ''];
  // Fewer hops than trusted proxies means the request skipped a proxy: the leftmost is the best there is.
  const picked = hops[Math.max(0, hops.length - 1 - trustedProxies)];
  return normaliseIp(picked) ?? socket;
}

/** Parses TRUST_PROXY: off/false/0 (the default), on/true (one proxy), or the number of proxies in front. */
export function parseTrustProxy(value: string | undefined): number | null {
  const v = (value ?? '').trim().toLowerCase();
  if (v === '' || v === 'off' || v === 'false' || v === '0') return 0;
  if (v === 'on' || v === 'true') return 1;
  return /^[1-9]$/.test(v) ? Number(v) : null;
}

/** True for an address or host name only this machine can reach. */
export function isLoopbackHost(host: string): boolean {
  const h = host
    .trim()
    .toLowerCase()
    .replace(/^\[|\]$/g, '');
  if (h === 'localhost' || h === '::1') return true;
  const ip = normaliseIp(h);
  return ip !== null && isIP(ip) === 4 && ip.startsWith('127.');
}
