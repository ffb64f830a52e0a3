/**
 * Two origins. `linkOrigin()` is where e-mailed links point: AUTH_URL (or PUBLIC_URL), else
 * the address this server listens on (HOST, PORT), and never anything a request says, so a
 * forged Host or X-Forwarded-Host cannot put a stranger's host into a sign-in e-mail.
 * `publicOrigin(request)` is the origin the browser sees, for the same-site check and for
 * auth core: Astro's request URL says "localhost" unless security.allowedDomains is configured
 * at build time, so it reads the Host header (and, behind a trusted proxy, X-Forwarded-Proto /
 * X-Forwarded-Host) unless AUTH_URL / PUBLIC_URL is set.
 */
import { trustProxy } from './settings';

const hostPattern = /^(?:[a-z0-9.-]+|\[[0-9a-f:.]+\])(?::\d{1,5})?$/i;

export function configuredOrigin(): string | null {
  // An empty value counts as unset.
  const configured = process.env.AUTH_URL || process.env.PUBLIC_URL;
  if (!configured) return null;
  try {
    return new URL(configured).origin;
  } catch {
    return null;
  }
}

/** `http://host:port` for a listening address; a wildcard address is reached on loopback. */
export function listeningOrigin(host: string, port: number | string): string {
  const name = host === '' || host === '0.0.0.0' || host === '::' || host === '[::]' ? '127.0.0.1' : host;
  const bracketed = name.includes(':') && !name.startsWith('[') ? `[${name}]` : name;
  return new URL(`http://${bracketed}:${port}`).origin;
}

/**
 * The origin of every link in an e-mail (sign-in, invitation, signing, reminders). `npm start`
 * and the test servers set PUBLIC_URL; production sets AUTH_URL or PUBLIC_URL to the public
 * https address.
 */
export function linkOrigin(): string {
  return configuredOrigin() ?? listeningOrigin(process.env.HOST ?? '127.0.0.1', process.env.PORT ?? 4321);
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
