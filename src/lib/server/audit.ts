/**
 * The append-only audit trail. Each event's hash covers the previous event's hash and the
 * event's own fields (canonical JSON, SHA-256), so any later edit or deletion breaks the
 * chain at that row. Write events inside the same transaction as the change they record.
 * Verification (per organisation, over the whole chain) lives in audit-trail.ts.
 */
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import type { SessionUser } from './session-user';

export const genesisHash = '0'.repeat(64);

export interface AuditEventInput {
  organisationId: string | null;
  actorUserId?: string | null;
  actorLabel?: string | null;
  action: string;
  entityType?: string | null;
  entityId?: string | null;
  ip?: string | null;
  detail?: Record<string, unknown>;
}

interface StoredAuditFields {
  organisation_id: string | null;
  actor_user_id: string | null;
  actor_label: string | null;
  action: string;
  entity_type: string | null;
  entity_id: string | null;
  ip: string | null;
  detail: Record<string, unknown>;
  created_at: string;
}

function canonical(value: unknown): string {
  if (value === null || typeof value !== 'object') return JSON.stringify(value ?? null);
  if (Array.isArray(value)) return `[${value.map(canonical).join(',')}]`;
  const entries = Object.entries(value as Record<string, unknown>)
    .filter(([, v]) => v !== undefined)
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonical(v)}`).join(',')}}`;
}

/** The columns among `keys` whose stored value differs, each with its value before and after. */
export function changedColumns(
  before: Record<string, unknown>,
  after: Record<string, unknown>,
  keys: readonly string[],
): Record<string, { from: unknown; to: unknown }> {
  const changes: Record<string, { from: unknown; to: unknown }> = {};
  for (const key of keys)
    if (canonical(before[key]) !== canonical(after[key]))
      changes[key] = { from: before[key] ?? null, to: after[key] ?? null };
  return changes;
}

export function auditHash(prevHash: string, fields: StoredAuditFields): string {
  return createHash('sha256').update(prevHash).update('\n').update(canonical(fields)).digest('hex');
}

/** Appends one event; serialised by a transaction-scoped advisory lock so the chain never forks. Returns its id and hash. */
export async function recordAudit(
  trx: Knex.Transaction,
  event: AuditEventInput,
): Promise<{ id: number; hash: string }> {
  await trx.raw('select pg_advisory_xact_lock(hashtext(?))', ['audit_events']);
  const last = await trx('audit_events').orderBy('id', 'desc').first('hash');
  const prevHash: string = last?.hash ?? genesisHash;
  const createdAt = new Date().toISOString();
  const fields: StoredAuditFields = {
    organisation_id: event.organisationId,
    actor_user_id: event.actorUserId ?? null,
    actor_label: event.actorLabel ?? null,
    action: event.action,
    entity_type: event.entityType ?? null,
    entity_id: event.entityId ?? null,
    ip: event.ip ?? null,
    detail: event.detail ?? {},
    created_at: createdAt,
  };
  const hash = auditHash(prevHash, fields);
  const [row] = await trx('audit_events')
    .insert({ ...fields, detail: JSON.stringify(fields.detail), prev_hash: prevHash, hash })
    .returning('id');
  return { id: Number(row.id), hash };
}

/** Appends an event done by a signed-in person (actor, organisation and client address filled in). */
export function recordByPerson(
  trx: Knex.Transaction,
  person: Pick<SessionUser, 'id' | 'email' | 'organisationId'>,
  ip: string | null | undefined,
  event: Pick<AuditEventInput, 'action' | 'entityType' | 'entityId' | 'detail'>,
): Promise<{ id: number; hash: string }> {
  return recordAudit(trx, {
    ...event,
    organisationId: person.organisationId,
    actorUserId: person.id,
    actorLabel: person.email,
    ip: ip ?? null,
  });
}

/**
 * Inserts one row of the person's organisation into `table` and records it in the audit trail in
 * the same transaction: `action` on `entityType` with the new row's id, the detail built from the
 * row as stored (`returning`, every column by default). Answers the stored row.
 */
export async function insertAudited<Row extends { id: string }>(
  trx: Knex.Transaction,
  person: Pick<SessionUser, 'id' | 'email' | 'organisationId'>,
  ip: string | null | undefined,
  insert: {
    table: string;
    values: Record<string, unknown>;
    returning?: readonly string[];
    action: string;
    entityType: string;
    detail: (row: Row) => Record<string, unknown>;
  },
): Promise<Row> {
  const [row] = (await trx(insert.table)
    .insert({ ...insert.values, organisation_id: person.organisationId })
    .returning(insert.returning ? [...insert.returning] : '*')) as Row[];
  await recordByPerson(trx, person, ip, {
    action: insert.action,
    entityType: insert.entityType,
    entityId: row!.id,
    detail: insert.detail(row!),
  });
  return row!;
}
