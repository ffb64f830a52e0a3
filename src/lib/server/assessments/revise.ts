/**
 * Corrections to a signed assessment: the signed one stays as it is (the database refuses
 * any other change) and becomes `superseded`; a new draft copies its answers, measurements,
 * observations, photos and force traces, and points back at it through supersedes_id.
 * Owner and office may revise any report, an auditor only their own. Discarding the draft
 * revision (`discardAssessment`) puts the original back to signed.
 */
import type { Knex } from 'knex';
import { recordAudit } from '../audit';
import { db } from '../db';
import { ConflictError, ForbiddenError, NotFoundError } from '../errors';
import type { SessionUser } from '../session-user';

/** Copies every column of the child rows except their identity and creation time. */
async function copyChildren(
  trx: Knex.Transaction,
  table: 'assessment_photos' | 'force_traces',
  fromId: string,
  toId: string,
): Promise<number> {
  const { rows } = await trx.raw<{ rows: Array<{ column_name: string }> }>(
    `select column_name from information_schema.columns
      where table_schema = current_schema() and table_name = ? and column_name not in ('id', 'assessment_id', 'created_at')
      order by ordinal_position`,
    [table],
  );
  const columns = rows.map((r) => trx.raw('??', [r.column_name]).toQuery()).join(', ');
  const copied = await trx.raw(
    `insert into ?? (assessment_id, ${columns}) select ?, ${columns} from ?? where assessment_id = ? order by created_at`,
    [table, toId, table, fromId],
  );
  return copied.rowCount ?? 0;
}

export async function reviseAssessment(
  viewer: SessionUser,
  assessmentId: string,
  facts: { ip: string | null },
  knex: Knex = db(),
): Promise<{ id: string; supersedesId: string }> {
  return knex.transaction(async (trx) => {
    const old = await trx('assessments')
      .where({ id: assessmentId, organisation_id: viewer.organisationId })
      .forUpdate()
      .first(
        'id',
        'status',
        'gate_id',
        'ruleset_version_id',
        'auditor_id',
        'purpose',
        'answers',
        'measurements',
        'observations',
        'visited_on',
      );
    if (!old) throw new NotFoundError('That assessment');
    // Owner and office revise any report; an auditor only a report they walked themselves.
    if (viewer.role === 'auditor' && old.auditor_id !== viewer.id) {
      throw new ForbiddenError(
        "This is another auditor's report; only they, the office or the owner may revise it.",
      );
    }
    if (old.status === 'superseded') throw new ConflictError('This assessment already has a newer revision.');
    if (old.status !== 'signed')
      throw new ConflictError(
        `Only a signed assessment is revised; this one is ${old.status.replace(/_/g, ' ')} and can be changed directly.`,
      );
    const [created] = await trx('assessments')
      .insert({
        organisation_id: viewer.organisationId,
        gate_id: old.gate_id,
        ruleset_version_id: old.ruleset_version_id,
        auditor_id: viewer.role === 'auditor' ? viewer.id : old.auditor_id,
        status: 'draft',
        purpose: old.purpose,
        answers: JSON.stringify(old.answers ?? {}),
        measurements: JSON.stringify(old.measurements ?? {}),
        observations: JSON.stringify(old.observations ?? {}),
        visited_on: old.visited_on,
        supersedes_id: old.id,
      })
      .returning('id');
    const photos = await copyChildren(trx, 'assessment_photos', old.id, created.id);
    const traces = await copyChildren(trx, 'force_traces', old.id, created.id);
    // The only change the signed-assessment guard lets through.
    await trx('assessments').where({ id: old.id }).update({ status: 'superseded', updated_at: trx.fn.now() });
    await recordAudit(trx, {
      organisationId: viewer.organisationId,
      actorUserId: viewer.id,
      actorLabel: viewer.email,
      action: 'assessment.revised',
      entityType: 'assessment',
      entityId: created.id,
      ip: facts.ip,
      detail: { supersedesId: old.id, photosCopied: photos, forceTracesCopied: traces },
    });
    return { id: created.id, supersedesId: old.id };
  });
}
