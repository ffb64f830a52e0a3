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
import { enqueueMail, wakeOutboxWorker } from '../outbox';
import { hashPassword } from '../passwords';
import { staffRoles } from '../session-user';
import { passwordResetMail } from './mails';
import { linkOrigin } from './public-origin';
import { checkThrottle, recordAttempt } from './throttle';
import { hashLinkToken, looksLikeLinkToken, newLinkToken } from './tokens';

/** Long enough to find the mail; short enough that an old mail in an inbox is useless. */
export const passwordResetMinutes = 30;

export type ResetRequestOutcome = { outcome: 'accepted' } | { outcome: 'throttled'; retryAfterSeconds: number };

export async function requestPasswordReset(email: string, ip: string | null): Promise<ResetRequestOutcome> {
  const address = email.trim().toLowerCase();
  const prepared = await db().transaction(async (trx) => {
    await trx.raw('select pg_advisory_xact_lock(hashtext(?))', [`password-reset:${address}`]);
    const throttle = await checkThrottle(trx, 'reset_request', address, ip);
    if (throttle.throttled) return { kind: 'throttled' as const, retryAfterSeconds: throttle.retryAfterSeconds };
    const person = await trx('users as u')
      .join('organisations as o', 'o.id', 'u.organisation_id')
      .whereRaw('u.email = ?::citext', [address])
      .andWhere({ 'u.active': true })
      .whereIn('u.role', staffRoles as string[])
      .first('u.id', 'u.email', 'u.name', 'u.organisation_id', 'o.name as organisation_name');
    await recordAttempt(trx, 'reset_request', address, ip, Boolean(person));
    if (!person) return { kind: 'unknown' as const };
    const token = newLinkToken();
    await trx('sign_in_links').insert({
      user_id: person.id,
      purpose: 'password_reset',
      token_hash: hashLinkToken(token),
      expires_at: new Date(Date.now() + passwordResetMinutes * 60_000),
      requested_ip: ip,
    });
    const mail = passwordResetMail(person, person.organisation_name, `${linkOrigin()}/signin/reset?token=${token}`, passwordResetMinutes);
    await enqueueMail(trx, {
      organisationId: person.organisation_id,
      kind: 'password_reset',
      to: [person.email],
      ...mail,
      relatedType: 'user',
      relatedId: person.id,
    });
    await recordAudit(trx, {
      organisationId: person.organisation_id,
      actorLabel: person.email,
      action: 'password.reset_requested',
      entityType: 'user',
      entityId: person.id,
      ip,
    });
    return { kind: 'queued' as const };
  });
  if (prepared.kind === 'throttled') return { outcome: 'throttled', retryAfterSeconds: prepared.retryAfterSeconds };
  if (prepared.kind === 'queued') wakeOutboxWorker();
  return { outcome: 'accepted' };
}

/**
 * Uses a reset link up and sets the new password (already checked against PasswordSchema).
 * The token is used up in the statement that checks it, so two posts can never both succeed;
 * every other open reset link of the person is used up with it. False when the link is unknown,
 * used, expired, or the person is no longer active staff (nothing changes then).
 */
export async function resetPassword(token: unknown, newPassword: string, ip: string | null): Promise<boolean> {
  if (!looksLikeLinkToken(token)) return false;
  const newHash = await hashPassword(newPassword);
  return db().transaction(async (trx) => {
    const [link] = await trx('sign_in_links')
      .where({ token_hash: hashLinkToken(token), purpose: 'password_reset' })
      .whereNull('used_at')
      .andWhere('expires_at', '>', trx.fn.now())
      .update({ used_at: trx.fn.now() })
      .returning(['id', 'user_id']);
    if (!link) return false;
    const person = await trx('users').where({ id: link.user_id }).first('id', 'email', 'role', 'active', 'organisation_id');
    if (!person || !person.active || !staffRoles.includes(person.role)) return false;
    await trx('users')
      .where({ id: person.id })
      .update({ password_hash: newHash, session_version: trx.raw('session_version + 1'), updated_at: trx.fn.now() });
    await trx('sign_in_links').where({ user_id: person.id, purpose: 'password_reset' }).whereNull('used_at').update({ used_at: trx.fn.now() });
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
