/**
 * Staff invitations: the owner names an e-mail and a role, the invitee gets a one-time link
 * and chooses their own name and password. The link's token is stored hashed; accepting it
 * creates the user and uses the invitation up in one transaction.
 */
import {
  roleLabels,
  type Invitation,
  type InvitationAccept,
  type InvitationCreate,
  type StaffRole,
} from '@/lib/api/users';
import { recordAudit } from './audit';
import { invitationMail } from './auth/mails';
import { linkOrigin } from './auth/public-origin';
import { hashLinkToken, looksLikeLinkToken, newLinkToken } from './auth/tokens';
import { db } from './db';
import { ConflictError, NotFoundError } from './errors';
import { iso, pgErrorCode } from './listing';
import { enqueueMail, wakeOutboxWorker } from './outbox';
import { hashPassword } from './passwords';
import type { Actor } from './users';

export const invitationValidDays = 7;

const UNIQUE_VIOLATION = '23505';

interface InvitationRow {
  id: string;
  email: string;
  role: StaffRole;
  expires_at: Date;
  created_at: Date;
}

function toInvitation(row: InvitationRow): Invitation {
  return {
    id: row.id,
    email: row.email,
    role: row.role,
    expiresAt: iso(row.expires_at),
    createdAt: iso(row.created_at),
  };
}

/** Invitations not yet accepted, revoked or expired. */
export async function listOpenInvitations(organisationId: string): Promise<Invitation[]> {
  const rows = await db()('invitations')
    .where({ organisation_id: organisationId })
    .whereNull('accepted_at')
    .whereNull('revoked_at')
    .andWhere('expires_at', '>', db().fn.now())
    .orderBy('created_at', 'desc')
    .select<InvitationRow[]>('id', 'email', 'role', 'expires_at', 'created_at');
  return rows.map(toInvitation);
}

/**
 * Creates an invitation (replacing any open one of this organisation for the same address)
 * and queues the e-mail with its link in the same transaction (the outbox delivers it, and
 * keeps it while SMTP is down). 409 when the address already has an account or another
 * organisation's open invitation.
 */
export async function inviteStaff(
  organisationId: string,
  input: InvitationCreate,
  actor: Actor,
): Promise<Invitation> {
  const token = newLinkToken();
  const invitation = await db().transaction(async (trx) => {
    const existing = await trx('users').whereRaw('email = ?::citext', [input.email]).first('id');
    if (existing)
      throw new ConflictError('Someone with this e-mail address already has an account.', {}, [
        { field: 'email', message: 'already has an account' },
      ]);
    const revoked = await trx('invitations')
      .where({ organisation_id: organisationId })
      .whereRaw('email = ?::citext', [input.email])
      .whereNull('accepted_at')
      .whereNull('revoked_at')
      .update({ revoked_at: trx.fn.now() })
      .returning('id');
    let row: InvitationRow;
    try {
      [row] = await trx('invitations')
        .insert({
          organisation_id: organisationId,
          email: input.email,
          role: input.role,
          token_hash: hashLinkToken(token),
          invited_by: actor.user.id,
          expires_at: new Date(Date.now() + invitationValidDays * 24 * 3600_000),
        })
        .returning(['id', 'email', 'role', 'expires_at', 'created_at']);
    } catch (error) {
      if (pgErrorCode(error) === UNIQUE_VIOLATION) {
        throw new ConflictError('This address already has an open invitation elsewhere.', {}, [
          { field: 'email', message: 'already invited' },
        ]);
      }
      throw error;
    }
    await recordAudit(trx, {
      organisationId,
      actorUserId: actor.user.id,
      actorLabel: actor.user.email,
      action: 'invitation.created',
      entityType: 'invitation',
      entityId: row.id,
      ip: actor.ip,
      detail: { email: input.email, role: input.role, replaced: revoked.length },
    });
    const org = await trx('organisations').where({ id: organisationId }).first('name');
    const mail = invitationMail(
      org.name,
      actor.user.name,
      roleLabels[input.role],
      `${linkOrigin()}/invite/${token}`,
      invitationValidDays,
    );
    await enqueueMail(trx, {
      organisationId,
      kind: 'invitation',
      to: [input.email],
      ...mail,
      relatedType: 'invitation',
      relatedId: row.id,
    });
    return row;
  });
  wakeOutboxWorker();
  return toInvitation(invitation);
}

export async function revokeInvitation(organisationId: string, id: string, actor: Actor): Promise<boolean> {
  return db().transaction(async (trx) => {
    const [row] = await trx('invitations')
      .where({ organisation_id: organisationId, id })
      .whereNull('accepted_at')
      .whereNull('revoked_at')
      .update({ revoked_at: trx.fn.now() })
      .returning(['id', 'email']);
    if (!row) return false;
    await recordAudit(trx, {
      organisationId,
      actorUserId: actor.user.id,
      actorLabel: actor.user.email,
      action: 'invitation.revoked',
      entityType: 'invitation',
      entityId: id,
      ip: actor.ip,
      detail: { email: row.email },
    });
    return true;
  });
}

export interface OpenInvitation {
  email: string;
  role: StaffRole;
  organisationName: string;
}

/** What the invitation page shows before accepting; null for a used, revoked, expired or unknown token. */
export async function findOpenInvitation(token: string): Promise<OpenInvitation | null> {
  if (!looksLikeLinkToken(token)) return null;
  const row = await db()('invitations as i')
    .join('organisations as o', 'o.id', 'i.organisation_id')
    .where('i.token_hash', hashLinkToken(token))
    .whereNull('i.accepted_at')
    .whereNull('i.revoked_at')
    .andWhere('i.expires_at', '>', db().fn.now())
    .first('i.email', 'i.role', 'o.name as organisation_name');
  return row ? { email: row.email, role: row.role, organisationName: row.organisation_name } : null;
}

const invitationNotValid = () =>
  new NotFoundError({ message: 'This invitation link is not valid any more. Ask for a new one.' });

/** Creates the invited person's account; NotFoundError when the link is used, revoked, expired or unknown. */
export async function acceptInvitation(
  token: string,
  input: InvitationAccept,
  ip: string | null,
): Promise<{ id: string; email: string; role: StaffRole }> {
  if (!looksLikeLinkToken(token)) throw invitationNotValid();
  // A dead or made-up token costs one indexed read, never a password hash (see resetPassword).
  if (!(await findOpenInvitation(token))) throw invitationNotValid();
  const passwordHash = await hashPassword(input.password);
  return db().transaction(async (trx) => {
    const invitation = await trx('invitations')
      .where({ token_hash: hashLinkToken(token) })
      .whereNull('accepted_at')
      .whereNull('revoked_at')
      .andWhere('expires_at', '>', trx.fn.now())
      .forUpdate()
      .first('id', 'organisation_id', 'email', 'role');
    if (!invitation) throw invitationNotValid();
    let user: { id: string; email: string; role: StaffRole };
    try {
      [user] = await trx('users')
        .insert({
          organisation_id: invitation.organisation_id,
          email: invitation.email,
          name: input.name,
          role: invitation.role,
          password_hash: passwordHash,
        })
        .returning(['id', 'email', 'role']);
    } catch (error) {
      if (pgErrorCode(error) === UNIQUE_VIOLATION)
        throw new ConflictError('Someone with this e-mail address already has an account.');
      throw error;
    }
    await trx('invitations')
      .where({ id: invitation.id })
      .update({ accepted_at: trx.fn.now(), accepted_user_id: user.id });
    await recordAudit(trx, {
      organisationId: invitation.organisation_id,
      actorUserId: user.id,
      actorLabel: user.email,
      action: 'invitation.accepted',
      entityType: 'user',
      entityId: user.id,
      ip,
      detail: { invitationId: invitation.id, role: user.role },
    });
    return user;
  });
}
