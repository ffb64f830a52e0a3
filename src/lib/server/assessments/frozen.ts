/**
 * Reading a submitted assessment as it was judged: its frozen record (parsed strictly) with
 * the few live facts that are not part of what was judged — its status in the signing flow,
 * the revision it replaces, and how the organisation shows dates and units.
 */
import type { Knex } from 'knex';
import type { AssessmentStatus } from '@/lib/api/assessments';
import { parseScoredRecord, type ScoredRecord } from './scored-record';

export interface FrozenAssessment {
  id: string;
  organisationId: string;
  auditorId: string;
  status: AssessmentStatus;
  supersedesId: string | null;
  signedAt: Date | null;
  /** Presentation settings of the organisation today (not part of the judgement). */
  timeZone: string;
  displayUnits: 'imperial' | 'metric';
  record: ScoredRecord;
}

/**
 * The assessment's frozen record, or null when there is no such assessment in the organisation;
 * `{ record: null }` while it is still a draft. A record that does not parse throws
 * CorruptRecordError.
 */
export async function loadFrozenAssessment(
  knex: Knex,
  organisationId: string,
  assessmentId: string,
  options: { lock?: boolean } = {},
): Promise<FrozenAssessment | { id: string; status: 'draft'; auditorId: string; record: null } | null> {
  const query = knex('assessments as a')
    .join('organisations as o', 'o.id', 'a.organisation_id')
    .where({ 'a.organisation_id': organisationId, 'a.id': assessmentId })
    .first(
      'a.id',
      'a.organisation_id',
      'a.auditor_id',
      'a.status',
      'a.supersedes_id',
      'a.signed_at',
      'a.scored_record',
      'o.time_zone',
      'o.display_units',
    );
  if (options.lock) query.forUpdate('a');
  const row = await query;
  if (!row) return null;
  if (row.status === 'draft') return { id: row.id, status: 'draft', auditorId: row.auditor_id, record: null };
  return {
    id: row.id,
    organisationId: row.organisation_id,
    auditorId: row.auditor_id,
    status: row.status,
    supersedesId: row.supersedes_id,
    signedAt: row.signed_at,
    timeZone: row.time_zone,
    displayUnits: row.display_units,
    record: parseScoredRecord(row.id, row.scored_record),
  };
}
