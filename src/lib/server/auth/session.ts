/**
 * Reads the session cookie (auth core's encrypted JWT) and reloads the person it names.
 * A session holds only while the user is active and their session_version still matches the
 * one in the token, so deactivation and role changes end it on the next request.
 */
import { getToken } from '@auth/core/jwt';
import type { SessionOrganisation, SessionUser } from '../session-user';
import { loadSession } from '../users';
import { authSecret, sessionCookieNames } from './settings';

export type SessionRead =
  | { state: 'none' }
  /** A cookie was sent but no longer holds (expired, tampered, deactivated, role changed). */
  | { state: 'ended' }
  | { state: 'active'; user: SessionUser; organisation: SessionOrganisation };

function sentCookie(cookieHeader: string, name: string): boolean {
  return cookieHeader.split(';').some((part) => {
    const key = part.split('=')[0]?.trim() ?? '';
    return key === name || key.startsWith(`${name}.`);
  });
}

export async function readSession(request: Request): Promise<SessionRead> {
  const cookieHeader = request.headers.get('cookie') ?? '';
  // A __Secure- cookie can only have been set over TLS, so prefer it when both are present.
  const secureCookie = sentCookie(cookieHeader, sessionCookieNames.secure);
  if (!secureCookie && !sentCookie(cookieHeader, sessionCookieNames.plain)) return { state: 'none' };
  const cookieName = secureCookie ? sessionCookieNames.secure : sessionCookieNames.plain;
  const token = await getToken({ req: request, secret: authSecret(), secureCookie, cookieName, salt: cookieName, logger: { error: () => {}, warn: () => {}, debug: () => {} } }).catch(() => null);
  if (!token?.sub || typeof token.sessionVersion !== 'number') return { state: 'ended' };
  const session = await loadSession(token.sub, token.sessionVersion);
  return session ? { state: 'active', ...session } : { state: 'ended' };
}
