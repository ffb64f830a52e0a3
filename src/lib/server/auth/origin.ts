/**
 * Refuses state-changing requests sent from another site: HTML forms, JSON and any other body
 * (Astro's own checkOrigin is off; see astro.config.mjs). Browsers send Origin on every
 * cross-site POST/PUT/PATCH/DELETE (and Referer when they do not); a request with neither is
 * not from a browser page and cannot ride on a visitor's cookies.
 */
import { configuredOrigin, directOrigin, publicOrigin } from './public-origin';

const stateChanging = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

function originOf(value: string | null): string | null | 'opaque' {
  if (value === null) return null;
  if (value === 'null') return 'opaque';
  try {
    return new URL(value).origin;
  } catch {
    return 'opaque';
  }
}

export function isCrossSiteWrite(request: Request): boolean {
  if (!stateChanging.has(request.method.toUpperCase())) return false;
  const claimed = originOf(request.headers.get('origin')) ?? originOf(request.headers.get('referer'));
  if (claimed === null) return false;
  const own = new Set([directOrigin(request), publicOrigin(request), configuredOrigin()].filter(Boolean));
  return claimed === 'opaque' || !own.has(claimed);
}
