/**
 * The two ways in, as auth core's `authorize` callbacks call them: a staff member's e-mail
 * and password, and a homeowner's one-time link. Each checks the throttle, records the
 * attempt and writes the audit event in one transaction, and never says which part of a
 * staff sign-in was wrong.
 */
import type { Knex } from 'knex';
import { recordAudit } from '../audit';
import { db } from '../db';
import { hashPassword, verifyPassword } from '../passwords';
import { staffRoles, type Role } from '../session-user';
import { checkThrottle, recordAttempt } from './throttle';
import { hashLinkToken, looksLikeLinkToken } from './tokens';

/** What goes into the session JWT. */
export interface SignedInPerson {
  id: string;
  email: string;
  name: string;
  role: Role;
  sessionVersion: number;
}

export type SignInOutcome =
  | { outcome: 'signed_in'; person: SignedInPerson }
  | { outcome: 'invalid' }
  | { outcome: 'throttled'; retryAfterSeconds: number };

interface PersonRow {
  id: string;
  organisation_id: string;
  email: string;
  name: string;
  role: Role;
  password_hash: string | null;
  active: boolean;
  session_version: number;
}

const personColumns = [
  'id',
  'organisation_id',
  'email',
  'name',
  'role',
  'password_hash',
  'active',
  'session_version',
] as const;

function toPerson(row: PersonRow): SignedInPerson {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    sessionVersion: row.session_version,
  };
}

let dummyHash: Promise<string> | undefined;

/** Verifies against a throwaway hash when there is no account, so timing does not tell. */
async function passwordMatches(row: PersonRow | undefined, password: string): Promise<boolean> {
  if (row?.password_hash) return verifyPassword(row.password_hash, password);
  dummyHash ??= hashPassword('no account has this password');
  await verifyPassword(await dummyHash, password);
  return false;
}

async function markSignedIn(
  trx: Knex.Transaction,
  row: PersonRow,
  method: 'password' | 'email_link',
  ip: string | null,
  userAgent: string | null,
) {
  await trx('users').where({ id: row.id }).update({ last_signed_in_at: trx.fn.now() });
  await recordAudit(trx, {
    organisationId: row.organisation_id,
    actorUserId: row.id,
    actorLabel: row.email,
    action: 'sign_in.succeeded',
    entityType: 'user',
    entityId: row.id,
    ip,
    detail: { method, ...(userAgent ? { userAgent: userAgent.slice(0, 300) } : {}) },
  });
}

export interface PasswordAttempt {
  email: string;
  password: string;
  ip: string | null;
  userAgent: string | null;
}

export async function signInWithPassword(attempt: PasswordAttempt): Promise<SignInOutcome> {
  const email = attempt.email.trim().toLowerCase();
  return db().transaction(async (trx) => {
    // One attempt per account at a time, so parallel guesses cannot overshoot the limit.
    await trx.raw('select pg_advisory_xact_lock(hashtext(?))', [`sign-in:${email}`]);
    const row: PersonRow | undefined = await trx('users')
      .whereRaw('email = ?::citext', [email])
      .first(personColumns);
    const throttle = await checkThrottle(trx, 'password', email, attempt.ip);
    if (throttle.throttled) {
      await recordAudit(trx, {
        organisationId: row?.organisation_id ?? null,
        actorLabel: email,
        action: 'sign_in.throttled',
        entityType: row ? 'user' : null,
        entityId: row?.id ?? null,
        ip: attempt.ip,
        detail: { email, method: 'password', scope: throttle.scope },
      });
      return { outcome: 'throttled', retryAfterSeconds: throttle.retryAfterSeconds };
    }
    const matches = await passwordMatches(row, attempt.password);
    const allowed = matches && row !== undefined && row.active && staffRoles.includes(row.role);
    await recordAttempt(trx, 'password', email, attempt.ip, allowed);
    if (allowed) {
      await markSignedIn(trx, row, 'password', attempt.ip, attempt.userAgent);
      return { outcome: 'signed_in', person: toPerson(row) };
    }
    const reason = !row
      ? 'unknown_account'
      : !matches
        ? 'wrong_password'
        : !row.active
          ? 'deactivated'
          : 'not_staff';
    await recordAudit(trx, {
      organisationId: row?.organisation_id ?? null,
      actorLabel: email,
      action: 'sign_in.failed',
      entityType: row ? 'user' : null,
      entityId: row?.id ?? null,
      ip: attempt.ip,
      detail: { email, method: 'password', reason },
    });
    return { outcome: 'invalid' };
  });
}

/**
 * Redeems a one-time sign-in link: the token is used up in the same statement that checks it,
 * so two clicks (or a replay) can never both succeed.
 */
export async function signInWithLink(
  token: unknown,
  ip: string | null,
  userAgent: string | null,
): Promise<SignInOutcome> {
  if (!looksLikeLinkToken(token)) return { outcome: 'invalid' };
  return db().transaction(async (trx) => {
    const [link] = await trx('sign_in_links')
      .where({ token_hash: hashLinkToken(token), purpose: 'sign_in' })
      .whereNull('used_at')
      .andWhere('expires_at', '>', trx.fn.now())
      .update({ used_at: trx.fn.now() })
      .returning(['id', 'user_id']);
    const row: PersonRow | undefined = link
      ? await trx('users').where({ id: link.user_id }).first(personColumns)
      : undefined;
    const allowed = row !== undefined && row.active && row.role === 'homeowner';
    await recordAttempt(trx, 'link', row?.email ?? null, ip, allowed);
    if (allowed) {
      await markSignedIn(trx, row, 'email_link', ip, userAgent);
      return { outcome: 'signed_in', person: toPerson(row) };
    }
    await recordAudit(trx, {
      organisationId: row?.organisation_id ?? null,
      actorLabel: row?.email ?? null,
      action: 'sign_in.failed',
      entityType: row ? 'user' : null,
      entityId: row?.id ?? null,
      ip,
      detail: {
        method: 'email_link',
        reason: row ? 'deactivated' : 'link_used_or_expired',
        ...(row ? { email: row.email } : {}),
      },
    });
    return { outcome: 'invalid' };
  });
}
