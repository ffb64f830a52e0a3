/**
 * Which paths need a session. Matching runs on a normalised path (decoded repeatedly, dot
 * segments resolved, slashes collapsed, lower-cased, no trailing slash) so that
 * `/%61pi/clients`, `/api//clients`, `/api/clients/` and `/API/clients` are all `/api/clients`
 * here, whatever the router makes of them.
 */

/** Page areas that need a signed-in person; anything under them too. */
export const protectedPagePrefixes = [
  '/assessments',
  '/clients',
  '/sites',
  '/gates',
  '/archive',
  '/rulesets',
  '/mail',
  '/settings',
  '/staff',
  '/walk',
  '/reports',
  '/documents',
  '/account',
] as const;

/** API routes anyone may call. Everything else under /api answers 401 without a session. */
const publicApi: readonly RegExp[] = [
  /^\/api\/health$/,
  /^\/api\/auth(\/.*)?$/,
  /^\/api\/verify(\/.*|-.*)?$/,
  /^\/api\/sign\/.+$/,
  /^\/api\/invitations\/[^/]+\/accept$/,
];

export function normalisePath(pathname: string): string {
  let path = pathname;
  for (let i = 0; i < 8; i++) {
    let decoded: string;
    try {
      decoded = decodeURIComponent(path);
    } catch {
      break; // a stray % stays as it is; it then matches nothing public
    }
    if (decoded === path) break;
    path = decoded;
  }
  const segments: string[] = [];
  for (const segment of path.replace(/\\/g, '/').split('/')) {
    const s = segment.trim();
    if (s === '' || s === '.') continue;
    if (s === '..') segments.pop();
    else segments.push(s);
  }
  return `/${segments.join('/')}`.toLowerCase();
}

function under(path: string, prefix: string): boolean {
  return path === prefix || path.startsWith(`${prefix}/`);
}

export function isApiPath(path: string): boolean {
  return under(path, '/api');
}

export function isPublicApiPath(path: string): boolean {
  return publicApi.some((pattern) => pattern.test(path));
}

export function isProtectedPage(path: string): boolean {
  return protectedPagePrefixes.some((prefix) => under(path, prefix));
}

/** A `next` target that stays on this site: a path, never `//host` or `/\host`. */
export function safeNext(next: string | null | undefined, fallback = '/assessments'): string {
  if (
    !next ||
    !next.startsWith('/') ||
    next.startsWith('//') ||
    next.startsWith('/\\') ||
    /[\u0000-\u001f]/.test(next)
  )
    return fallback;
  return next;
}
