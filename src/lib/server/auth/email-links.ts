/**
 * Homeowners and property managers sign in with a one-time link. Asking for one always gets
 * the same answer whether or not the address is known, and the mail is queued in the outbox
 * (delivered by its worker, retried while SMTP is down), so neither the reply nor its timing
 * tells who has an account. The link points at the configured public origin, never at the
 * host the request names.
 */
import { recordAudit } from '../audit';
import { db } from '../db';
import { enqueueMail, wakeOutboxWorker } from '../outbox';
import { signInLinkMail } from './mails';
import { linkOrigin } from './public-origin';
import { checkThrottle, recordAttempt } from './throttle';
import { hashLinkToken, newLinkToken } from './tokens';

/** Long enough to switch to the mail app and back; short enough that an old mail is useless. */
export const signInLinkMinutes = 20;

export type LinkRequestOutcome = { outcome: 'accepted' } | { outcome: 'throttled'; retryAfterSeconds: number };

export async function requestSignInLink(email: string, ip: string | null): Promise<LinkRequestOutcome> {
  const address = email.trim().toLowerCase();
  const prepared = await db().transaction(async (trx) => {
    await trx.raw('select pg_advisory_xact_lock(hashtext(?))', [`sign-in-link:${address}`]);
    const throttle = await checkThrottle(trx, 'link_request', address, ip);
    if (throttle.throttled) return { kind: 'throttled' as const, retryAfterSeconds: throttle.retryAfterSeconds };
    const person = await trx('users as u')
      .join('organisations as o', 'o.id', 'u.organisation_id')
      .whereRaw('u.email = ?::citext', [address])
      .andWhere({ 'u.role': 'homeowner', 'u.active': true })
      .first('u.id', 'u.email', 'u.name', 'u.organisation_id', 'o.name as organisation_name');
    await recordAttempt(trx, 'link_request', address, ip, Boolean(person));
    if (!person) return { kind: 'unknown' as const };
    const token = newLinkToken();
    await trx('sign_in_links').insert({
      user_id: person.id,
      purpose: 'sign_in',
      token_hash: hashLinkToken(token),
      expires_at: new Date(Date.now() + signInLinkMinutes * 60_000),
      requested_ip: ip,
    });
    const mail = signInLinkMail(person, person.organisation_name, `${linkOrigin()}/signin/link?token=${token}`, signInLinkMinutes);
    await enqueueMail(trx, {
      organisationId: person.organisation_id,
      kind: 'sign_in_link',
      to: [person.email],
      ...mail,
      relatedType: 'user',
      relatedId: person.id,
    });
    await recordAudit(trx, {
      organisationId: person.organisation_id,
      actorLabel: person.email,
      action: 'sign_in.link_sent',
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
