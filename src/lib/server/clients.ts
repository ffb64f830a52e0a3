/**
 * Clients of the contracting organisation: the one module that holds their SQL. Every query
 * is scoped to the viewer's organisation; a homeowner sees only the client they belong to.
 */
import type { Knex } from 'knex';
import { countAssessmentsOfGates, loadFrozenAssessment } from './assessments';
import type { Client, ClientCreate, ClientListQuery, ClientPatch } from '@/lib/api/clients';
import type { Page } from '@/lib/api/common';
import { insertAudited, recordAudit, recordByPerson } from './audit';
import { db } from './db';
import { ConflictError } from './errors';
import { containsPattern, fetchPage, iso } from './listing';
import type { SessionUser } from './session-user';

interface ClientRow {
  id: string;
  name: string;
  kind: Client['kind'];
  contact_email: string | null;
  phone: string | null;
  notes: string | null;
  created_at: Date;
  updated_at: Date;
}

const columns = [
  'c.id',
  'c.name',
  'c.kind',
  'c.contact_email',
  'c.phone',
  'c.notes',
  'c.created_at',
  'c.updated_at',
] as const;

const returnedColumns = columns.map((c) => c.slice('c.'.length));

const sortColumns: Record<ClientListQuery['sort']['field'], string> = {
  name: 'c.name',
  createdAt: 'c.created_at',
  updatedAt: 'c.updated_at',
};

function toClient(row: ClientRow): Client {
  return {
    id: row.id,
    name: row.name,
    kind: row.kind,
    contactEmail: row.contact_email,
    phone: row.phone ?? null,
    notes: row.notes,
    createdAt: iso(row.created_at),
    updatedAt: iso(row.updated_at),
  };
}

function toRow(
  input: ClientCreate | ClientPatch,
): Partial<Omit<ClientRow, 'id' | 'created_at' | 'updated_at'>> {
  const row: Partial<Omit<ClientRow, 'id' | 'created_at' | 'updated_at'>> = {};
  if (input.name !== undefined) row.name = input.name;
  if (input.kind !== undefined) row.kind = input.kind;
  if (input.contactEmail !== undefined) row.contact_email = input.contactEmail;
  if (input.phone !== undefined) row.phone = input.phone;
  if (input.notes !== undefined) row.notes = input.notes;
  return row;
}

/** The clients a viewer may see. */
function visibleClients(knex: Knex, viewer: SessionUser): Knex.QueryBuilder {
  const query = knex('clients as c').where('c.organisation_id', viewer.organisationId);
  if (viewer.role === 'homeowner') query.andWhere('c.id', viewer.clientId);
  return query;
}

export async function listClients(viewer: SessionUser, query: ClientListQuery): Promise<Page<Client>> {
  const base = visibleClients(db(), viewer);
  if (query.kind) base.andWhere('c.kind', query.kind);
  if (query.q) {
    const pattern = containsPattern(query.q);
    base.andWhere((w) =>
      w
        .whereILike('c.name', pattern)
        .orWhereILike('c.contact_email', pattern)
        .orWhereILike('c.phone', pattern),
    );
  }
  return fetchPage<ClientRow, Client>(
    {
      base,
      columns,
      order: { column: sortColumns[query.sort.field], direction: query.sort.direction },
      idColumn: 'c.id',
      map: toClient,
    },
    query,
  );
}

export async function getClient(viewer: SessionUser, id: string, knex: Knex = db()): Promise<Client | null> {
  const row = await visibleClients(knex, viewer).andWhere('c.id', id).first<ClientRow | undefined>(columns);
  return row ? toClient(row) : null;
}

/** Creates a client; the audit trail records it with who made it. */
export async function createClient(
  viewer: SessionUser,
  input: ClientCreate,
  knex: Knex = db(),
  options: { ip?: string | null } = {},
): Promise<Client> {
  return knex.transaction(async (trx) => {
    const row = await insertAudited<ClientRow>(trx, viewer, options.ip, {
      table: 'clients',
      values: toRow(input),
      returning: returnedColumns,
      action: 'client.created',
      entityType: 'client',
      detail: (stored) => ({ client: toClient(stored) }),
    });
    return toClient(row);
  });
}

/**
 * Changes a client. When the contact e-mail is corrected, the homeowner sign-in account of this
 * client that used the old address follows it, in the same transaction: its e-mail changes, its
 * session_version moves on (every session of that account ends), its unused sign-in links are
 * used up (the old address can no longer sign in), and an audit event names both addresses.
 * A new address that already belongs to another account is refused (409, nothing changes).
 * Clearing the contact e-mail leaves the account as it is.
 */
export async function updateClient(
  viewer: SessionUser,
  id: string,
  patch: ClientPatch,
  options: { ip?: string | null } = {},
): Promise<Client | null> {
  return db().transaction(async (trx) => {
    const before = await trx('clients')
      .where({ id, organisation_id: viewer.organisationId })
      .forUpdate()
      .first<ClientRow | undefined>(returnedColumns);
    if (!before) return null;
    const oldEmail = before.contact_email;
    const newEmail = patch.contactEmail;
    const emailChanged =
      newEmail !== undefined && (newEmail ?? '').toLowerCase() !== (oldEmail ?? '').toLowerCase();
    const [row] = await trx('clients')
      .where({ id, organisation_id: viewer.organisationId })
      .update({ ...toRow(patch), updated_at: trx.fn.now() })
      .returning<ClientRow[]>(returnedColumns);
    const followers: { id: string; email: string }[] = [];
    if (emailChanged && oldEmail && newEmail) {
      const accounts = await trx('users')
        .where({ organisation_id: viewer.organisationId, client_id: id, role: 'homeowner' })
        .andWhereRaw('email = ?::citext', [oldEmail])
        .forUpdate()
        .select<{ id: string; email: string }[]>('id', 'email');
      if (accounts.length) {
        const taken = await trx('users').whereRaw('email = ?::citext', [newEmail]).first('id');
        if (taken) {
          throw new ConflictError(
            'Another sign-in account already uses that e-mail address; the client was not changed.',
            {},
            [{ field: 'contactEmail', message: 'already belongs to another sign-in account' }],
          );
        }
      }
      for (const account of accounts) {
        await trx('users')
          .where({ id: account.id })
          .update({
            email: newEmail,
            session_version: trx.raw('session_version + 1'),
            updated_at: trx.fn.now(),
          });
        await trx('sign_in_links')
          .where({ user_id: account.id })
          .whereNull('used_at')
          .update({ used_at: trx.fn.now() });
        followers.push(account);
        await recordAudit(trx, {
          organisationId: viewer.organisationId,
          actorUserId: viewer.id,
          actorLabel: viewer.email,
          action: 'user.email_changed',
          entityType: 'user',
          entityId: account.id,
          ip: options.ip ?? null,
          detail: {
            from: account.email,
            to: newEmail,
            clientId: id,
            reason: 'client contact e-mail corrected',
            sessionsEnded: true,
          },
        });
      }
    }
    const changed = Object.keys(toRow(patch)).filter(
      (key) =>
        (before as unknown as Record<string, unknown>)[key] !==
        (row as unknown as Record<string, unknown>)[key],
    );
    if (changed.length) {
      await recordAudit(trx, {
        organisationId: viewer.organisationId,
        actorUserId: viewer.id,
        actorLabel: viewer.email,
        action: 'client.updated',
        entityType: 'client',
        entityId: id,
        ip: options.ip ?? null,
        detail: {
          fields: changed,
          ...(emailChanged ? { contactEmail: { from: oldEmail, to: newEmail ?? null } } : {}),
          accountsFollowed: followers.map((f) => f.id),
        },
      });
    }
    return toClient(row);
  });
}

/**
 * Deletes a client with its sites and gates, in one transaction. Refused (409) while any of
 * its gates has an assessment on record, or while a homeowner account belongs to it.
 */
export async function deleteClient(viewer: SessionUser, id: string): Promise<boolean> {
  return db().transaction(async (trx) => {
    const client = await visibleClients(trx, viewer).andWhere('c.id', id).forUpdate().first('c.id');
    if (!client) return false;
    const siteIds = trx('sites')
      .select('id')
      .where({ organisation_id: viewer.organisationId, client_id: id });
    const gateIds = trx('gates').select('id').whereIn('site_id', siteIds);
    await trx('gates').whereIn('id', gateIds.clone()).forUpdate().select('id');
    const assessments = await countAssessmentsOfGates(trx, gateIds.clone());
    if (assessments > 0) {
      throw new ConflictError(
        `This client has ${assessments} assessment(s) on record, and assessments are kept; the client cannot be deleted.`,
      );
    }
    const [{ count: accounts }] = await trx('users')
      .where({ organisation_id: viewer.organisationId, client_id: id })
      .count<{ count: string }[]>({ count: '*' });
    if (Number(accounts) > 0) {
      throw new ConflictError(
        `${accounts} sign-in account(s) belong to this client; remove them before deleting the client.`,
      );
    }
    await trx('gates').whereIn('id', gateIds).delete();
    await trx('sites').where({ organisation_id: viewer.organisationId, client_id: id }).delete();
    await trx('clients').where({ organisation_id: viewer.organisationId, id }).delete();
    return true;
  });
}

/**
 * The addresses the office may pick to receive an assessment's signing link: the client's
 * contact e-mail as frozen at submit and the e-mails of the client's active sign-in accounts,
 * without repeats.
 */
export async function signingContactsOfAssessment(
  organisationId: string,
  assessmentId: string,
  knex: Knex = db(),
): Promise<string[]> {
  // The client as frozen at submit: the link goes to whom the report was made for.
  const frozen = await loadFrozenAssessment(knex, organisationId, assessmentId);
  if (!frozen?.record) return [];
  const client = { id: frozen.record.client.id, contact_email: frozen.record.client.contactEmail };
  const accounts = await knex('users')
    .where({ organisation_id: organisationId, client_id: client.id, active: true })
    .orderBy('email')
    .pluck<string[]>('email');
  const seen = new Set<string>();
  return [client.contact_email, ...accounts].filter((email): email is string => {
    if (!email || seen.has(email.toLowerCase())) return false;
    seen.add(email.toLowerCase());
    return true;
  });
}
