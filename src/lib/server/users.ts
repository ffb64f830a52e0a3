/**
 * People of an organisation: the one module holding the users table's SQL. It also reloads
 * the session's person on every request, so a role change or a deactivation applies to the
 * very next request (both bump session_version, which the session cookie must match).
 */
import type { Knex } from 'knex';
import type { Page } from '@/lib/api/common';
import type { User, UserListQuery, UserPatch } from '@/lib/api/users';
import { recordAudit } from './audit';
import { db } from './db';
import { ConflictError, InvalidInputError } from './errors';
import { fetchPage, iso } from './listing';
import { toSessionOrganisation, organisationColumns, type OrganisationRow } from './organisations';
import type { Role, SessionOrganisation, SessionUser } from './session-user';

interface UserRow {
  id: string;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  client_id: string | null;
  last_signed_in_at: Date | null;
  created_at: Date;
}

const isUuid = (value: string) =>
  /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(value);

const columns = [
  'u.id',
  'u.email',
  'u.name',
  'u.role',
  'u.active',
  'u.client_id',
  'u.last_signed_in_at',
  'u.created_at',
] as const;

const sortColumns: Record<UserListQuery['sort']['field'], string> = {
  name: 'u.name',
  email: 'u.email',
  role: 'u.role',
  createdAt: 'u.created_at',
  lastSignedInAt: 'u.last_signed_in_at',
};

function toUser(row: UserRow): User {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    active: row.active,
    clientId: row.client_id,
    lastSignedInAt: row.last_signed_in_at ? iso(row.last_signed_in_at) : null,
    createdAt: iso(row.created_at),
  };
}

/**
 * The signed-in person and their organisation, or null when the session no longer holds:
 * the user is gone or deactivated, their session_version moved on, or this session (the
 * token's session id) was signed out.
 */
export async function loadSession(
  userId: string,
  sessionVersion: number,
  sessionId: string,
): Promise<{ user: SessionUser; organisation: SessionOrganisation } | null> {
  if (!isUuid(sessionId) || !isUuid(userId)) return null;
  const row = await db()('users as u')
    .join('organisations as o', 'o.id', 'u.organisation_id')
    .where({ 'u.id': userId, 'u.active': true, 'u.session_version': sessionVersion })
    .whereNotExists((q) => q.select(db().raw('1')).from('revoked_sessions as r').where('r.id', sessionId))
    .first<
      | (OrganisationRow & {
          user_id: string;
          email: string;
          user_name: string;
          role: Role;
          client_id: string | null;
        })
      | undefined
    >(
      'u.id as user_id',
      'u.email',
      'u.name as user_name',
      'u.role',
      'u.client_id',
      ...organisationColumns.map((c) => `o.${c}`),
    );
  if (!row) return null;
  return {
    user: {
      id: row.user_id,
      organisationId: row.id,
      email: row.email,
      name: row.user_name,
      role: row.role,
      clientId: row.client_id,
    },
    organisation: toSessionOrganisation(row),
  };
}

export async function listUsers(organisationId: string, query: UserListQuery): Promise<Page<User>> {
  const base = db()('users as u').where('u.organisation_id', organisationId);
  if (query.role) base.andWhere('u.role', query.role);
  if (query.active !== undefined) base.andWhere('u.active', query.active);
  return fetchPage<UserRow, User>(
    {
      base,
      columns,
      order: { column: sortColumns[query.sort.field], direction: query.sort.direction },
      idColumn: 'u.id',
      map: toUser,
    },
    query,
  );
}

/** One person of the organisation; null for a missing id or another organisation's. */
export async function getUser(organisationId: string, id: string, knex: Knex = db()): Promise<User | null> {
  const row = await knex('users as u')
    .where({ 'u.organisation_id': organisationId, 'u.id': id })
    .first<UserRow | undefined>(columns);
  return row ? toUser(row) : null;
}

export interface Actor {
  user: SessionUser;
  ip: string | null;
}

/**
 * Changes a person's role, active flag or name. Role and active changes end the person's
 * sessions (session_version + 1). The organisation always keeps at least one active owner.
 */
export async function updateUser(
  organisationId: string,
  id: string,
  patch: UserPatch,
  actor: Actor,
): Promise<User | null> {
  return db().transaction(async (trx) => {
    // Serialise changes to one organisation's people so the "last owner" check holds.
    await trx.raw('select pg_advisory_xact_lock(hashtext(?))', [`users-of:${organisationId}`]);
    const before = await getUser(organisationId, id, trx);
    if (!before) return null;
    if (before.role === 'homeowner' && patch.role !== undefined) {
      throw new InvalidInputError(
        'A homeowner or property manager cannot be given a staff role; invite them as staff instead.',
        [{ field: 'role', message: 'cannot change the role of a homeowner or property manager' }],
      );
    }
    const role = patch.role ?? before.role;
    const active = patch.active ?? before.active;
    const stopsBeingOwner = before.role === 'owner' && before.active && (role !== 'owner' || !active);
    if (stopsBeingOwner) {
      const [{ count }] = await trx('users')
        .where({ organisation_id: organisationId, role: 'owner', active: true })
        .whereNot({ id })
        .count({ count: '*' });
      if (Number(count) === 0)
        throw new ConflictError(
          'The organisation needs at least one active owner; make someone else owner first.',
        );
    }
    const roleChanged = role !== before.role;
    const activeChanged = active !== before.active;
    const changes: Record<string, unknown> = { updated_at: trx.fn.now() };
    if (roleChanged) changes.role = role;
    if (activeChanged) changes.active = active;
    if (patch.name !== undefined && patch.name !== before.name) changes.name = patch.name;
    if (roleChanged || activeChanged) changes.session_version = trx.raw('session_version + 1');
    await trx('users').where({ organisation_id: organisationId, id }).update(changes);

    const audit = (action: string, detail: Record<string, unknown>) =>
      recordAudit(trx, {
        organisationId,
        actorUserId: actor.user.id,
        actorLabel: actor.user.email,
        action,
        entityType: 'user',
        entityId: id,
        ip: actor.ip,
        detail,
      });
    if (roleChanged) await audit('user.role_changed', { email: before.email, from: before.role, to: role });
    if (activeChanged) await audit(active ? 'user.reactivated' : 'user.deactivated', { email: before.email });
    if (changes.name !== undefined) await audit('user.renamed', { from: before.name, to: patch.name });
    return getUser(organisationId, id, trx);
  });
}
