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
import { signInLinkMail, type LinkMail } from './mails';
import { linkOrigin } from './public-origin';
import { checkThrottle, recordAttempt, type AttemptKind } from './throttle';
import { hashLinkToken, newLinkToken } from './tokens';

/** Long enough to switch to the mail app and back; short enough that an old mail is useless. */
export const signInLinkMinutes = 20;

export type LinkRequestOutcome =
  { outcome: 'accepted' } | { outcome: 'throttled'; retryAfterSeconds: number };

/** What one kind of e-mailed one-time link is: who may get it, where it leads, what it says. */
export interface OneTimeLinkKind {
  /** Stored on the link row: a sign-in link never resets a password, nor the other way round. */
  purpose: 'sign_in' | 'password_reset';
  throttleKind: AttemptKind;
  /** Roles of the active accounts that may receive it; anyone else gets the same answer and no mail. */
  roles: readonly string[];
  validMinutes: number;
  /** The page the link opens, e.g. `/signin/link`; the token goes in its query. */
  path: string;
  mail: (to: { name: string }, organisationName: string, link: string, validMinutes: number) => LinkMail;
  mailKind: string;
  auditAction: string;
}

/**
 * Throttles, and for a known address stores a hashed one-time token, queues its mail in the
 * outbox and audits it, all in one transaction; the answer is the same for an unknown address.
 */
export async function mailOneTimeLink(
  kind: OneTimeLinkKind,
  email: string,
  ip: string | null,
): Promise<LinkRequestOutcome> {
  const address = email.trim().toLowerCase();
  const prepared = await db().transaction(async (trx) => {
    await trx.raw('select pg_advisory_xact_lock(hashtext(?))', [`${kind.purpose}:${address}`]);
    const throttle = await checkThrottle(trx, kind.throttleKind, address, ip);
    if (throttle.throttled)
      return { kind: 'throttled' as const, retryAfterSeconds: throttle.retryAfterSeconds };
    const person = await trx('users as u')
      .join('organisations as o', 'o.id', 'u.organisation_id')
      .whereRaw('u.email = ?::citext', [address])
      .andWhere({ 'u.active': true })
      .whereIn('u.role', kind.roles as string[])
      .first('u.id', 'u.email', 'u.name', 'u.organisation_id', 'o.name as organisation_name');
    await recordAttempt(trx, kind.throttleKind, address, ip, Boolean(person));
    if (!person) return { kind: 'unknown' as const };
    const token = newLinkToken();
    await trx('sign_in_links').insert({
      user_id: person.id,
      purpose: kind.purpose,
      token_hash: hashLinkToken(token),
      expires_at: new Date(Date.now() + kind.validMinutes * 60_000),
      requested_ip: ip,
    });
    const mail = kind.mail(
      person,
      person.organisation_name,
      `${linkOrigin()}${kind.path}?token=${token}`,
      kind.validMinutes,
    );
    await enqueueMail(trx, {
      organisationId: person.organisation_id,
      kind: kind.mailKind,
      to: [person.email],
      ...mail,
      relatedType: 'user',
      relatedId: person.id,
    });
    await recordAudit(trx, {
      organisationId: person.organisation_id,
      actorLabel: person.email,
      action: kind.auditAction,
      entityType: 'user',
      entityId: person.id,
      ip,
    });
    return { kind: 'queued' as const };
  });
  if (prepared.kind === 'throttled')
    return { outcome: 'throttled', retryAfterSeconds: prepared.retryAfterSeconds };
  if (prepared.kind === 'queued') wakeOutboxWorker();
  return { outcome: 'accepted' };
}

const signInLink: OneTimeLinkKind = {
  purpose: 'sign_in',
  throttleKind: 'link_request',
  roles: ['homeowner'],
  validMinutes: signInLinkMinutes,
  path: '/signin/link',
  mail: signInLinkMail,
  mailKind: 'sign_in_link',
  auditAction: 'sign_in.link_sent',
};

export function requestSignInLink(email: string, ip: string | null): Promise<LinkRequestOutcome> {
  return mailOneTimeLink(signInLink, email, ip);
}
