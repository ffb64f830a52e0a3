/**
 * Signing out. Session cookies are signed tokens valid until they expire, so removing the
 * cookie is not enough: the session's id goes into revoked_sessions and every request refuses
 * it (a copied cookie stops working too). Other sessions of the same person go on. To end a
 * person's sessions everywhere, bump users.session_version (deactivation, role and password
 * changes do).
 */
import type { AstroCookies } from 'astro';
import { recordAudit } from '../audit';
import { db } from '../db';
import { sessionCookieNames } from './settings';

export interface EndedSession {
  id: string;
  expiresAt: Date;
}

export async function recordSignOut(
  userId: string,
  ip: string | null,
  session: EndedSession | null,
): Promise<void> {
  await db().transaction(async (trx) => {
    const user = await trx('users').where({ id: userId }).first('id', 'organisation_id', 'email');
    if (!user) return;
    if (session) {
      await trx('revoked_sessions')
        .insert({ id: session.id, user_id: user.id, expires_at: session.expiresAt })
        .onConflict('id')
        .ignore();
      // Revoked ids are only needed until their token would have expired anyway.
      await trx('revoked_sessions').where('expires_at', '<', trx.fn.now()).del();
    }
    await recordAudit(trx, {
      organisationId: user.organisation_id,
      actorUserId: user.id,
      actorLabel: user.email,
      action: 'sign_out',
      entityType: 'user',
      entityId: user.id,
      ip,
    });
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
