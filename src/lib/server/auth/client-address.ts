/**
 * The caller's IP address as a value PostgreSQL's inet accepts, or null. Astro's node adapter
 * gives the first X-Forwarded-For entry when present, else the socket address; in production
 * put the app behind a proxy that overwrites X-Forwarded-For, or per-address throttling can be
 * dodged (per-account throttling cannot).
 */
import { isIP } from 'node:net';

export function normaliseAddress(raw: string | null | undefined): string | null {
  if (!raw) return null;
  const value = raw.trim().replace(/^::ffff:(?=\d+\.\d+\.\d+\.\d+$)/, '');
  return isIP(value) ? value : null;
}

/** `clientAddress` throws for prerendered routes; this never does. */
export function clientAddressOf(context: { clientAddress: string }): string | null {
  try {
    return normaliseAddress(context.clientAddress);
  } catch {
    return null;
  }
}
