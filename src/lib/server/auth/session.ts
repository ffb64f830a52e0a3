/**
 * Reads the session cookie (auth core's encrypted JWT) and reloads the person it names.
 * A session holds only while the user is active, their session_version still matches the one
 * in the token and the token's session id (`sid`) was not signed out, so deactivation, role
 * changes, a password change and signing out end it on the next request.
 *
 * The decoded cookie and the answer of that check are remembered for a few seconds
 * (`session-cache.ts`): a change made by this process is seen at once, one made by another
 * instance within SESSION_RECHECK_MS.
 */
import { encode, getToken, type JWT } from '@auth/core/jwt';
import type { AstroCookies } from 'astro';
import type { SessionOrganisation, SessionUser } from '../session-user';
import { loadSession } from '../users';
import {
  decodedCookie,
  heldSession,
  rememberDecodedCookie,
  rememberSession,
  sessionCheckEpoch,
} from './session-cache';
import { authSecret, sessionCookieNames } from './settings';

export type SessionRead =
  | { state: 'none' }
  /** A cookie was sent but no longer holds (expired, tampered, deactivated, role changed, signed out). */
  | { state: 'ended' }
  | { state: 'active'; user: SessionUser; organisation: SessionOrganisation; session: SessionToken };

/** What a request's session cookie says, decoded. */
export interface SessionToken {
  token: JWT;
  /** The session id, set once at sign-in and kept for the session's life. */
  id: string;
  /** When the token expires by itself. */
  expiresAt: Date;
  cookieName: string;
  secure: boolean;
}

function sentCookie(cookieHeader: string, name: string): boolean {
  return cookieHeader.split(';').some((part) => {
    const key = part.split('=')[0]?.trim() ?? '';
    return key === name || key.startsWith(`${name}.`);
  });
}

/** The session cookie's own pieces (the cookie and its chunks), exactly as sent, in order sent. */
function sessionCookieText(cookieHeader: string, name: string): string {
  return cookieHeader
    .split(';')
    .map((part) => part.trim())
    .filter((part) => {
      const key = part.slice(0, Math.max(0, part.indexOf('=')));
      return key === name || key.startsWith(`${name}.`);
    })
    .join('; ');
}

const quiet = { error: () => {}, warn: () => {}, debug: () => {} };

/** Decodes the session cookie: 'none' when none was sent, null when it cannot be read or lacks a session id. */
export async function decodeSessionCookie(request: Request): Promise<SessionToken | null | 'none'> {
  const cookieHeader = request.headers.get('cookie') ?? '';
  // A __Secure- cookie can only have been set over TLS, so prefer it when both are present.
  const secure = sentCookie(cookieHeader, sessionCookieNames.secure);
  if (!secure && !sentCookie(cookieHeader, sessionCookieNames.plain)) return 'none';
  const cookieName = secure ? sessionCookieNames.secure : sessionCookieNames.plain;
  // The same cookie text decodes to the same token (until it expires): decrypt it once.
  const text = `${cookieName}\n${sessionCookieText(cookieHeader, cookieName)}`;
  const known = decodedCookie<SessionToken>(text);
  if (known) return known;
  const token = await getToken({
    req: request,
    secret: authSecret(),
    secureCookie: secure,
    cookieName,
    salt: cookieName,
    logger: quiet,
  }).catch(() => null);
  if (
    !token?.sub ||
    typeof token.sessionVersion !== 'number' ||
    typeof token.sid !== 'string' ||
    typeof token.exp !== 'number'
  )
    return null;
  const session = { token, id: token.sid, expiresAt: new Date(token.exp * 1000), cookieName, secure };
  Object.freeze(token);
  Object.freeze(session);
  rememberDecodedCookie(text, session, session.expiresAt);
  return session;
}

export async function readSession(request: Request): Promise<SessionRead> {
  const decoded = await decodeSessionCookie(request);
  if (decoded === 'none') return { state: 'none' };
  if (!decoded?.token.sub || typeof decoded.token.sessionVersion !== 'number') return { state: 'ended' };
  const { sub, sessionVersion } = decoded.token;
  const held = heldSession(decoded.id, sub, sessionVersion);
  if (held) return { state: 'active', ...held, session: decoded };
  const startedEpoch = sessionCheckEpoch();
  const session = await loadSession(sub, sessionVersion, decoded.id);
  if (!session) return { state: 'ended' };
  rememberSession(decoded.id, sub, sessionVersion, session, startedEpoch);
  return { state: 'active', ...session, session: decoded };
}

/**
 * Writes this session's cookie again with a new session_version (after a password change, which
 * moves the version on to end every other session): same session id, same expiry.
 */
export async function reissueSessionCookie(
  session: SessionToken,
  sessionVersion: number,
  cookies: AstroCookies,
): Promise<void> {
  const maxAge = Math.max(1, Math.floor((session.expiresAt.getTime() - Date.now()) / 1000));
  const { exp: _exp, iat: _iat, jti: _jti, ...claims } = session.token;
  const value = await encode({
    token: { ...claims, sessionVersion },
    secret: authSecret(),
    salt: session.cookieName,
    maxAge,
  });
  cookies.set(session.cookieName, value, {
    path: '/',
    httpOnly: true,
    sameSite: 'lax',
    secure: session.secure,
    expires: session.expiresAt,
  });
}
