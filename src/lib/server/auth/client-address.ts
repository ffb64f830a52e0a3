/**
 * The caller's IP address: what throttling counts, audit events and signature records keep,
 * and what the signed PDF prints.
 *
 * X-Forwarded-For is believed only as far as the operator says proxies stand in front of the
 * app (`TRUST_PROXY`, a number of hops, default 0):
 *
 * - 0 (or unset): the address of the TCP peer (the socket); X-Forwarded-For is ignored.
 * - N: the Nth address from the right of X-Forwarded-For, the one the outermost of the N
 *   proxies saw (each proxy appends the address it received the request from). A header with
 *   fewer entries gives its left-most one; an entry that is not an IP address gives the socket
 *   address instead.
 *
 * The built server applies this before Astro reads the request (`client-address-hook.ts`), so
 * `context.clientAddress` is already the trusted address; nothing that is not an IP address
 * (node:net isIP) is ever returned, and IPv4-mapped IPv6 (`::ffff:192.0.2.1`) becomes IPv4.
 */
import { isIP } from 'node:net';

export function normaliseAddress(raw: string | null | undefined): string | null {
  if (!raw) return null;
  let value = raw.trim();
  // Some proxies add the port: [2001:db8::1]:443, 192.0.2.1:8080.
  value =
    /^\[([^\]]+)\](?::\d+)?$/.exec(value)?.[1] ?? /^(\d{1,3}(?:\.\d{1,3}){3}):\d+$/.exec(value)?.[1] ?? value;
  // An IPv6 zone (fe80::1%eth0) names an interface of this host; the address is what counts.
  value = value.replace(/%[0-9A-Za-z._~-]+$/, '');
  const mapped = /^::ffff:(\d{1,3}\.\d{1,3}\.\d{1,3}\.\d{1,3})$/i.exec(value);
  if (mapped) value = mapped[1];
  if (!isIP(value)) return null;
  return value.includes(':') ? value.toLowerCase() : value;
}

/** Hops at most: more than this is a typo, not a network. */
const MAX_PROXY_HOPS = 16;

/** Reads `TRUST_PROXY`: unset or empty is 0; anything but a whole number 0–16 is refused loudly. */
export function trustedProxyHops(value: string | undefined = process.env.TRUST_PROXY): number {
  const text = (value ?? '').trim();
  if (text === '') return 0;
  if (!/^\d+$/.test(text) || Number(text) > MAX_PROXY_HOPS) {
    throw new Error(
      `TRUST_PROXY must be the number of proxies in front of the app (0 to ${MAX_PROXY_HOPS}), not "${value}".`,
    );
  }
  return Number(text);
}

/**
 * The client address for one request, from its socket address and X-Forwarded-For (a header
 * sent several times arrives joined with commas), trusting `hops` proxies.
 */
export function trustedClientAddress(
  socketAddress: string | null | undefined,
  forwardedFor: string | string[] | null | undefined,
  hops: number,
): string | null {
  const socket = normaliseAddress(socketAddress);
  if (hops <= 0) return socket;
  const entries = (Array.isArray(forwardedFor) ? forwardedFor.join(',') : (forwardedFor ?? ''))
    .split(',')
    .map((entry) => entry.trim())
    .filter(Boolean);
  if (entries.length === 0) return socket;
  const chosen = entries[Math.max(0, entries.length - hops)];
  return normaliseAddress(chosen) ?? socket;
}

/** `clientAddress` throws for prerendered routes; this never does. */
export function clientAddressOf(context: { clientAddress: string }): string | null {
  try {
    return normaliseAddress(context.clientAddress);
  } catch {
    return null;
  }
}
