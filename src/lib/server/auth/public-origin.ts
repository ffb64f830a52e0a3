/**
 * The origin the browser sees. Astro's request URL says "localhost" unless
 * security.allowedDomains is configured at build time, so we read the Host header (and,
 * behind a trusted proxy, X-Forwarded-Proto / X-Forwarded-Host). AUTH_URL (or PUBLIC_URL)
 * wins when set, and should be set in production: e-mailed links use this origin, and a
 * forged Host header must not be able to put a stranger's host into a sign-in e-mail.
 */
import { trustProxy } from './settings';

const hostPattern = /^(?:[a-z0-9.-]+|\[[0-9a-f:.]+\])(?::\d{1,5})?$/i;

export function configuredOrigin(): string | null {
  const configured = process.env.AUTH_URL ?? process.env.PUBLIC_URL;
  if (!configured) return null;
  try {
    return new URL(configured).origin;
  } catch {
    return null;
  }
}

function first(value: string | null): string | undefined {
  return value?.split(',')[0]?.trim() || undefined;
}

/** `proto://host` as the client addressed this server, ignoring any proxy. */
export function directOrigin(request: Request): string {
  const url = new URL(request.url);
  const host = first(request.headers.get('host'));
  return host && hostPattern.test(host) ? `${url.protocol}//${host.toLowerCase()}` : url.origin;
}

export function publicOrigin(request: Request): string {
  const configured = configuredOrigin();
  if (configured) return configured;
  const direct = new URL(directOrigin(request));
  if (!trustProxy()) return direct.origin;
  const proto = first(request.headers.get('x-forwarded-proto'));
  const host = first(request.headers.get('x-forwarded-host'));
  const protocol = proto === 'https' || proto === 'http' ? proto : direct.protocol.slice(0, -1);
  const authority = host && hostPattern.test(host) ? host.toLowerCase() : direct.host;
  return `${protocol}://${authority}`;
}
