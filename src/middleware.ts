/**
 * Every request passes here once: refuse cross-site writes, read the session (one cookie
 * decode and one query), put `user` and `organisation` on locals, keep signed-out callers
 * out of protected pages (redirect to /signin) and the API (401 problem+json), and add the
 * security headers. Role checks per endpoint stay in the handlers (`requireRole`).
 */
import type { APIContext, MiddlewareNext } from 'astro';
import { defineMiddleware } from 'astro:middleware';
import { crossSiteRefusal, isCrossSiteWrite } from '@/lib/server/auth/origin';
import { isApiPath, isProtectedPage, isPublicApiPath, normalisePath } from '@/lib/server/auth/paths';
import { readSession } from '@/lib/server/auth/session';
import { clearSessionCookies } from '@/lib/server/auth/sign-out';
import { isDatabaseUnavailable, problem } from '@/lib/server/http/problem';
import { countingQueries, queryCountHeader, queryCountingOn } from '@/lib/server/http/query-count';

const securityHeaders: Record<string, string> = {
  'x-content-type-options': 'nosniff',
  'referrer-policy': 'strict-origin-when-cross-origin',
  'x-frame-options': 'DENY',
  'content-security-policy': "frame-ancestors 'none'",
};

function withSecurityHeaders(response: Response, signedIn: boolean): Response {
  const apply = (headers: Headers) => {
    for (const [name, value] of Object.entries(securityHeaders))
      if (!headers.has(name)) headers.set(name, value);
    // Pages and answers for a signed-in person are theirs alone: no shared or back-button caches.
    if (signedIn && !headers.has('cache-control')) headers.set('cache-control', 'private, no-store');
  };
  try {
    apply(response.headers);
    return response;
  } catch {
    // Some responses (Response.redirect) have immutable headers: copy them.
    const copy = new Response(response.body, response);
    apply(copy.headers);
    return copy;
  }
}

async function guard(context: APIContext, next: MiddlewareNext): Promise<Response> {
  const path = normalisePath(context.url.pathname);
  const api = isApiPath(path);
  context.locals.user = null;
  context.locals.organisation = null;

  if (isCrossSiteWrite(context.request)) return withSecurityHeaders(crossSiteRefusal(context.request), false);

  let session: Awaited<ReturnType<typeof readSession>>;
  try {
    session = await readSession(context.request);
  } catch (error) {
    if (!isDatabaseUnavailable(error)) throw error;
    const unavailable = api
      ? problem(503, 'The database is unavailable; try again shortly.', {}, { 'retry-after': '5' })
      : new Response('Latchwell cannot reach its database right now. Try again in a moment.', {
          status: 503,
          headers: { 'retry-after': '5' },
        });
    return withSecurityHeaders(unavailable, false);
  }
  if (session.state === 'active') {
    context.locals.user = session.user;
    context.locals.organisation = session.organisation;
  } else if (session.state === 'ended') {
    clearSessionCookies(context.request.headers.get('cookie'), context.cookies);
  }
  const signedIn = session.state === 'active';

  if (!signedIn && api && !isPublicApiPath(path)) {
    return withSecurityHeaders(problem(401, 'Sign in to use this.'), false);
  }
  if (!signedIn && !api && isProtectedPage(path)) {
    const next = `${context.url.pathname}${context.url.search}`;
    return withSecurityHeaders(
      context.redirect(
        `/signin?next=${encodeURIComponent(next)}`,
        context.request.method === 'GET' || context.request.method === 'HEAD' ? 302 : 303,
      ),
      false,
    );
  }
  const response = await next();
  // An /api path with no route (or no handler for the method) answers like every other API error.
  if (api && response.status === 404 && !/json/.test(response.headers.get('content-type') ?? '')) {
    return withSecurityHeaders(problem(404, 'There is no such API route.'), signedIn);
  }
  return withSecurityHeaders(response, signedIn);
}

export const onRequest = defineMiddleware(async (context, next) => {
  if (!queryCountingOn()) return guard(context, next);
  const { result, queries } = await countingQueries(() => guard(context, next));
  try {
    result.headers.set(queryCountHeader, String(queries));
    return result;
  } catch {
    const copy = new Response(result.body, result);
    copy.headers.set(queryCountHeader, String(queries));
    return copy;
  }
});
