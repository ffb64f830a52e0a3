/**
 * Status changes of a submitted assessment in the signing flow, each one statement inside the
 * caller's transaction (sending and signing also store documents, links and mail there):
 * scored / awaiting_signature -> awaiting_signature, awaiting_signature -> signed. The
 * database guards keep the frozen record as it is through all of them.
 */
import type { Knex } from 'knex';
import type { AssessmentStatus } from '@/lib/api/assessments';
import { ConflictError } from '../errors';

export interface LockedAssessment {
  id: string;
  organisationId: string;
  status: AssessmentStatus;
  auditorId: string;
  resultSha256: string | null;
}

/** Locks the row (FOR UPDATE) for a status change; null when not in the organisation (or any, when null). */
export async function lockAssessment(
  trx: Knex.Transaction,
  id: string,
  organisationId: string | null,
): Promise<LockedAssessment | null> {
  const query = trx('assessments').where({ id });
  if (organisationId) query.andWhere({ organisation_id: organisationId });
  const row = await query.forUpdate().first('id', 'organisation_id', 'status', 'auditor_id', 'result_sha256');
  return row
    ? {
        id: row.id,
        organisationId: row.organisation_id,
        status: row.status,
        auditorId: row.auditor_id,
        resultSha256: row.result_sha256,
      }
    : null;
}

/** Statuses from which a report may be (re)sent for signature. */
export const SENDABLE_STATUSES: readonly AssessmentStatus[] = ['scored', 'awaiting_signature'];

export async function markAwaitingSignature(trx: Knex.Transaction, id: string): Promise<void> {
  const updated = await trx('assessments')
    .where({ id })
    .whereIn('status', SENDABLE_STATUSES)
    .update({
      status: 'awaiting_signature',
      row_version: trx.raw('row_version + 1'),
      updated_at: trx.fn.now(),
    });
  if (updated !== 1) throw new ConflictError('This assessment can no longer be sent for signature.');
}

export async function markSigned(trx: Knex.Transaction, id: string, signedAt: Date): Promise<void> {
  const updated = await trx('assessments')
    .where({ id, status: 'awaiting_signature' })
    .update({
      status: 'signed',
      signed_at: signedAt,
      row_version: trx.raw('row_version + 1'),
      updated_at: trx.fn.now(),
    });
  if (updated !== 1) throw new ConflictError('This report is no longer waiting for a signature.');
}
