/**
 * Signing out. Sessions are stateless JWTs, so signing out removes the cookie; to end a
 * person's sessions everywhere, bump users.session_version (deactivation and role changes do).
 */
import type { AstroCookies } from 'astro';
import { recordAudit } from '../audit';
import { db } from '../db';
import { sessionCookieNames } from './settings';

export async function recordSignOut(userId: string, ip: string | null): Promise<void> {
  await db().transaction(async (trx) => {
    const user = await trx('users').where({ id: userId }).first('id', 'organisation_id', 'email');
    if (!user) return;
    await recordAudit(trx, { organisationId: user.organisation_id, actorUserId: user.id, actorLabel: user.email, action: 'sign_out', entityType: 'user', entityId: user.id, ip });
  });
}

/** Deletes every session cookie the request carries (plain, __Secure- and their chunks). */
export function clearSessionCookies(cookieHeader: string | null, cookies: AstroCookies): void {
  const names = (cookieHeader ?? '').split(';').map((part) => part.split('=')[0]?.trim() ?? '');
  for (const name of names) {
    const base = name.replace(/\.\d+$/, '');
    if (base === sessionCookieNames.plain) cookies.delete(name, { path: '/' });
    if (base === sessionCookieNames.secure) cookies.delete(name, { path: '/', secure: true });
  }
}
