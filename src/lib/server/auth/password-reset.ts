/**
 * Staff "forgot password". Asking for a reset always gets the same answer whether or not the
 * address belongs to an active staff member (homeowners have no password, so their address
 * gets nothing either); requests are throttled per address and per client address like
 * homeowner link requests. The e-mail carries a one-time link from the same token store as
 * sign-in links (`sign_in_links`, purpose `password_reset`, SHA-256 only), queued in the outbox
 * in the transaction that makes it, pointing at the configured public origin.
 *
 * Using the link sets a new password and moves `users.session_version` on, which ends every
 * session of the person; they then sign in with the new password.
 */
import { recordAudit } from '../audit';
import { db } from '../db';
import { hashPassword } from '../passwords';
import { staffRoles } from '../session-user';
import { mailOneTimeLink, type LinkRequestOutcome, type OneTimeLinkKind } from './email-links';
import { passwordResetMail } from './mails';
import { hashLinkToken, looksLikeLinkToken } from './tokens';

/** Long enough to find the mail; short enough that an old mail in an inbox is useless. */
export const passwordResetMinutes = 30;

export type ResetRequestOutcome = LinkRequestOutcome;

const passwordResetLink: OneTimeLinkKind = {
  purpose: 'password_reset',
  throttleKind: 'reset_request',
  roles: staffRoles,
  validMinutes: passwordResetMinutes,
  path: '/signin/reset',
  mail: passwordResetMail,
  mailKind: 'password_reset',
  auditAction: 'password.reset_requested',
};

export function requestPasswordReset(email: string, ip: string | null): Promise<ResetRequestOutcome> {
  return mailOneTimeLink(passwordResetLink, email, ip);
}

/**
 * Uses a reset link up and sets the new password (already checked against PasswordSchema).
 * The token is used up in the statement that checks it, so two posts can never both succeed;
 * every other open reset link of the person is used up with it. False when the link is unknown,
 * used, expired, or the person is no longer active staff (nothing changes then).
 */
export async function resetPassword(
  token: unknown,
  newPassword: string,
  ip: string | null,
): Promise<boolean> {
  if (!looksLikeLinkToken(token)) return false;
  // A dead or made-up token costs one indexed read, never a password hash: hashing first would
  // let anyone make the server spend an argon2 hash per request with random tokens.
  const live = await db()('sign_in_links')
    .where({ token_hash: hashLinkToken(token), purpose: 'password_reset' })
    .whereNull('used_at')
    .andWhere('expires_at', '>', db().fn.now())
    .first('id');
  if (!live) return false;
  const newHash = await hashPassword(newPassword);
  return db().transaction(async (trx) => {
    const [link] = await trx('sign_in_links')
      .where({ token_hash: hashLinkToken(token), purpose: 'password_reset' })
      .whereNull('used_at')
      .andWhere('expires_at', '>', trx.fn.now())
      .update({ used_at: trx.fn.now() })
      .returning(['id', 'user_id']);
    if (!link) return false;
    const person = await trx('users')
      .where({ id: link.user_id })
      .first('id', 'email', 'role', 'active', 'organisation_id');
    if (!person || !person.active || !staffRoles.includes(person.role)) return false;
    await trx('users')
      .where({ id: person.id })
      .update({
        password_hash: newHash,
        session_version: trx.raw('session_version + 1'),
        updated_at: trx.fn.now(),
      });
    await trx('sign_in_links')
      .where({ user_id: person.id, purpose: 'password_reset' })
      .whereNull('used_at')
      .update({ used_at: trx.fn.now() });
    await recordAudit(trx, {
      organisationId: person.organisation_id,
      actorUserId: person.id,
      actorLabel: person.email,
      action: 'password.reset',
      entityType: 'user',
      entityId: person.id,
      ip,
      detail: { sessionsEnded: true },
    });
    return true;
  });
}
