/**
 * Sign-in settings read from the environment at run time (never inlined by the build), shared
 * by auth.config.ts, the auth endpoint and the middleware so they agree on secret and cookies.
 */

/** How long a session lasts from sign-in. Revocation does not wait for it: see session_version. */
export const sessionMaxAgeSeconds = 7 * 24 * 60 * 60;

/** AUTH_SECRET signs and encrypts the session JWT; without it nobody can sign in. */
export function authSecret(): string {
  const secret = process.env.AUTH_SECRET;
  if (!secret || secret.length < 32) throw new Error('AUTH_SECRET must be set to at least 32 characters');
  return secret;
}

export const sessionCookieNames = {
  plain: 'authjs.session-token',
  secure: '__Secure-authjs.session-token',
} as const;
