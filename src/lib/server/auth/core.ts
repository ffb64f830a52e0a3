/**
 * Runs auth core (the engine behind auth-astro) on a request: with auth.config.ts's options
 * (copied per call, never mutated) and the caller's address available to the callbacks.
 */
import { Auth } from '@auth/core';
import authConfig from '../../../../auth.config';
import { signInContext, type SignInContext } from './request-context';

export const authBasePath = '/api/auth';

function coreConfig() {
  // Drop auth-astro's own keys; the rest (secret read lazily from the env) is auth core's.
  const { prefix: _prefix, injectEndpoints: _inject, configFile: _file, ...options } = authConfig;
  return { ...options, basePath: authBasePath };
}

export function runAuthCore(request: Request, context: SignInContext): Promise<Response> {
  return signInContext.run(context, () => Auth(request, coreConfig()));
}

/**
 * A CSRF token for a page's sign-in or sign-out form (auth core's double-submit cookie):
 * the cookie, when new, is appended to `responseHeaders`.
 */
export async function csrfTokenForPage(
  request: Request,
  origin: string,
  responseHeaders: Headers,
): Promise<string> {
  const headers = new Headers({ accept: 'application/json' });
  const cookie = request.headers.get('cookie');
  if (cookie) headers.set('cookie', cookie);
  const response = await runAuthCore(new Request(`${origin}${authBasePath}/csrf`, { headers }), {
    ip: null,
    userAgent: null,
  });
  for (const line of response.headers.getSetCookie()) responseHeaders.append('set-cookie', line);
  const body = (await response.json()) as { csrfToken?: string };
  return body.csrfToken ?? '';
}
