/**
 * Auth core's endpoints (csrf, session, providers, signin, callback, signout) under /api/auth.
 * We mount them ourselves instead of letting auth-astro inject them so that auth core runs
 * with the caller's address at hand (throttling, audit), sees the public URL (Secure cookies
 * behind a TLS proxy), and so a refused sign-in answers an API client with problem+json
 * (401, 429 with Retry-After) while a browser form gets the sign-in page with the reason.
 */
import type { APIRoute } from 'astro';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { safeNext } from '@/lib/server/auth/paths';
import { linkOrigin } from '@/lib/server/auth/public-origin';
import { runAuthCore } from '@/lib/server/auth/core';
import type { SignInContext } from '@/lib/server/auth/request-context';
import { waitInWords } from '@/lib/server/auth/throttle';
import { boundedRequest, describeBytes } from '@/lib/server/http/body';
import { HttpProblem, problem } from '@/lib/server/http/problem';

export const prerender = false;

const actions = new Set([
  'providers',
  'session',
  'csrf',
  'signin',
  'signout',
  'callback',
  'verify-request',
  'error',
]);

/** Sign-in forms are tiny; anything bigger is not one. */
const maxFormBytes = 16 * 1024;
const tooLarge = () =>
  new HttpProblem(413, `The sign-in form is larger than the limit of ${describeBytes(maxFormBytes)}.`, {
    errors: [{ field: '', message: `must be at most ${maxFormBytes} bytes` }],
    limitBytes: maxFormBytes,
  });

/**
 * The same request, addressed to the public origin, with its body read within the limit
 * (body.ts) and handed to auth core as a re-built request of those bytes.
 */
async function forAuthCore(
  request: Request,
): Promise<{ request: Request; form: URLSearchParams } | Response> {
  const url = new URL(request.url);
  const target = new URL(`${url.pathname}${url.search}`, linkOrigin());
  try {
    const bounded = await boundedRequest(request, maxFormBytes, target, tooLarge);
    const isForm = (request.headers.get('content-type') ?? '').includes('application/x-www-form-urlencoded');
    return {
      request: bounded.request,
      form: isForm ? new URLSearchParams(bounded.bytes.toString('utf8')) : new URLSearchParams(),
    };
  } catch (error) {
    if (error instanceof HttpProblem) return error.toResponse();
    throw error;
  }
}

const refusals: Record<string, { status: number; detail: (ctx: SignInContext) => string }> = {
  throttled: {
    status: 429,
    detail: (ctx) => `Too many sign-in attempts. Try again in ${waitInWords(ctx.retryAfterSeconds ?? 900)}.`,
  },
  link: {
    status: 401,
    detail: () => 'This sign-in link has expired or was already used. Ask for a new one.',
  },
  credentials: { status: 401, detail: () => 'The e-mail address or password is not right.' },
};

/**
 * Auth core answers a refused sign-in with a redirect to /signin?error=…&code=…. Browsers get
 * that redirect with `next` (and the wait) kept; other clients get problem+json.
 */
function adaptRefusal(
  response: Response,
  caller: Request,
  form: URLSearchParams,
  ctx: SignInContext,
): Response {
  const location = response.headers.get('location');
  if (!location || response.status < 300 || response.status >= 400) return response;
  const target = new URL(location);
  const error = target.searchParams.get('error');
  if (target.pathname !== '/signin' || !error) return response;
  const code = target.searchParams.get('code') ?? '';
  const wantsHtml = (caller.headers.get('accept') ?? '').includes('text/html');
  if (!wantsHtml) {
    const headers: Record<string, string> = ctx.retryAfterSeconds
      ? { 'retry-after': String(ctx.retryAfterSeconds) }
      : {};
    const refusal = refusals[code];
    if (error === 'CredentialsSignin' && refusal)
      return problem(refusal.status, refusal.detail(ctx), { code }, headers);
    if (error === 'MissingCSRF')
      return problem(403, 'The sign-in form has expired; fetch a new CSRF token and try again.', {
        code: 'csrf',
      });
    return problem(400, 'The sign-in could not be completed.', { code: error });
  }
  const next = safeNext(form.get('callbackUrl'), '');
  if (next) target.searchParams.set('next', next);
  if (ctx.retryAfterSeconds) target.searchParams.set('wait', String(ctx.retryAfterSeconds));
  const headers = new Headers(response.headers);
  headers.set('location', `${target.pathname}${target.search}`);
  return new Response(null, { status: 303, headers });
}

const handler: APIRoute = async (context) => {
  const action = context.url.pathname.slice('/api/auth/'.length).split('/')[0] ?? '';
  if (!actions.has(action)) return problem(404, 'No such sign-in endpoint.');
  const prepared = await forAuthCore(context.request);
  if (prepared instanceof Response) return prepared;
  const ctx: SignInContext = {
    ip: clientAddressOf(context),
    userAgent: context.request.headers.get('user-agent'),
  };
  const response = await runAuthCore(prepared.request, ctx);
  return action === 'callback' ? adaptRefusal(response, context.request, prepared.form, ctx) : response;
};

export const GET = handler;
export const POST = handler;
