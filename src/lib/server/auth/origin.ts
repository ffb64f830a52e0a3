/**
 * Refuses state-changing requests sent from another site: HTML forms, JSON and any other body
 * (Astro's own checkOrigin is off; see astro.config.mjs). Browsers send Origin on every
 * cross-site POST/PUT/PATCH/DELETE (and Referer when they do not); a request with neither is
 * not from a browser page and cannot ride on a visitor's cookies. The claimed origin must be the
 * configured public origin (`linkOrigin`), never one derived from the request's Host or
 * X-Forwarded-* headers, which whoever sends the request writes.
 *
 * `Origin: null` is what a browser sends for a form on a page with `Referrer-Policy:
 * no-referrer`, and also for sandboxed frames and data: pages on any site. So it passes only
 * with `Sec-Fetch-Site: same-origin`, which the browser sets itself and page scripts cannot.
 * `Sec-Fetch-Site: cross-site` is refused whatever Origin says.
 */
import { problem } from '../http/problem';
import { linkOrigin } from './public-origin';

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
  const fetchSite = request.headers.get('sec-fetch-site')?.trim().toLowerCase();
  if (fetchSite === 'cross-site') return true;
  const origin = request.headers.get('origin');
  if (origin?.trim() === 'null') return fetchSite !== 'same-origin';
  const claimed = originOf(origin) ?? originOf(request.headers.get('referer'));
  if (claimed === null) return false;
  return claimed === 'opaque' || claimed !== linkOrigin();
}

const refusalDetail = 'Requests from another site are refused.';

const escapeHtml = (text: string) => text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

/**
 * The page for a refused browser post. It names Latchwell's configured address, since the usual
 * honest cause is the app opened at another name for the same machine (localhost for 127.0.0.1).
 */
const refusalPage = (origin: string) => `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>Not sent from Latchwell · Latchwell</title>
<style>body{margin:0;font:16px/1.5 system-ui,sans-serif;color:#1d2c3f;background:#f6f7f9}main{max-width:32rem;margin:0 auto;padding:2rem 1rem}h1{font-size:1.5rem;margin:0 0 .75rem}a{color:#1d2c3f;font-weight:600}</style>
</head>
<body>
<main>
<h1>This form did not come from Latchwell</h1>
<p>It was sent from another site or another address, so nothing was changed. Latchwell's address is <a href="${origin}/">${origin}</a>: open it there and try again from its own page.</p>
<p><a href="${origin}/">Go to Latchwell</a> · <a href="${origin}/signin">Sign in</a></p>
</main>
</body>
</html>
`;

/** 403: a readable page for a browser's form post or navigation, problem+json for everyone else. */
export function crossSiteRefusal(request: Request): Response {
  const page =
    request.headers.get('sec-fetch-mode') === 'navigate' ||
    (request.headers.get('accept') ?? '').includes('text/html');
  if (!page) return problem(403, refusalDetail);
  return new Response(refusalPage(escapeHtml(linkOrigin())), {
    status: 403,
    headers: { 'content-type': 'text/html; charset=utf-8', 'cache-control': 'no-store' },
  });
}
