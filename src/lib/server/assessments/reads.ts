/**
 * Reads of the `assessments` table for the other server modules: bases for the archive,
 * history, impact and document readers (the assessments of one organisation as `a`, optionally
 * joined to their gate `g`, site `s` and client `c`; readers add their own filters and columns),
 * joins from rows that reference an assessment, and the few whole reads other modules need.
 * Nothing here writes; writes go through the lifecycle functions of this module only. Ruleset
 * impact's reads are in impact-reads.ts.
 */
import type { Knex } from 'knex';

/** The organisation's assessments as `a`. */
export function organisationAssessments(knex: Knex, organisationId: string): Knex.QueryBuilder {
  return knex('assessments as a').where('a.organisation_id', organisationId);
}

/** The organisation's assessments as `a` with their gate `g`, site `s` and client `c` (live rows). */
export function organisationAssessmentsWithPlace(knex: Knex, organisationId: string): Knex.QueryBuilder {
  return knex('assessments as a')
    .join('gates as g', 'g.id', 'a.gate_id')
    .join('sites as s', 's.id', 'g.site_id')
    .join('clients as c', 'c.id', 's.client_id')
    .where('a.organisation_id', organisationId);
}

/**
 * Joins each row's assessment as `a`; `assessmentIdColumn` is the row's reference to it (e.g.
 * `d.assessment_id`). The caller reads `a`'s columns.
 */
export function joinAssessment(query: Knex.QueryBuilder, assessmentIdColumn: string): Knex.QueryBuilder {
  return query.join('assessments as a', 'a.id', assessmentIdColumn);
}

/**
 * Keeps the rows whose assessment (`assessmentIdColumn`, e.g. `d.assessment_id`) is of a gate at
 * one of the client's sites: what a homeowner may read (none for a null client). Joins the
 * assessment `a`, its gate `g` and site `s`.
 */
export function joinAssessmentOfClient(
  query: Knex.QueryBuilder,
  assessmentIdColumn: string,
  clientId: string | null,
): Knex.QueryBuilder {
  return joinAssessment(query, assessmentIdColumn)
    .join('gates as g', 'g.id', 'a.gate_id')
    .join('sites as s', 's.id', 'g.site_id')
    .andWhere('s.client_id', clientId);
}

/**
 * The ids (as text) of every assessment of the gate, as a subquery: for matching records that
 * name an assessment in a text column (audit events' `entity_id`).
 */
export function gateAssessmentIdsAsText(knex: Knex, gateId: string): Knex.QueryBuilder {
  return knex('assessments').select(knex.raw('id::text')).where('gate_id', gateId);
}

/**
 * The organisations that have signed assessments under a version of the ruleset other than
 * `exceptVersionId` (only `organisationId`, when given: an organisation's own ruleset).
 */
export async function organisationsSignedUnderOtherVersions(
  knex: Knex,
  rulesetId: string,
  exceptVersionId: string,
  organisationId: string | null,
): Promise<string[]> {
  const rows = (await knex('assessments as a')
    .join('ruleset_versions as rv', 'rv.id', 'a.ruleset_version_id')
    .where('rv.ruleset_id', rulesetId)
    .andWhereNot('rv.id', exceptVersionId)
    .andWhere('a.status', 'signed')
    .modify((q) => {
      if (organisationId) q.andWhere('a.organisation_id', organisationId);
    })
    .distinct('a.organisation_id')) as { organisation_id: string }[];
  return rows.map((r) => r.organisation_id);
}

/**
 * The select behind a `last_signed` common table expression: each gate's last signed assessment
 * (latest visit, then id) of the organisation, with its id, verdict, visit day in the
 * organisation's time zone and the result's re-inspection plan. Runs inside a query that defines
 * `org` (the organisation's `id` and `time_zone`) before it.
 */
export function lastSignedOfEachGateSql(): string {
  return `select distinct on (a.gate_id) a.gate_id, a.id, a.verdict, (coalesce(a.visited_on, a.created_at) at time zone org.time_zone)::date as visit,
              a.result -> 'reinspection' as plan
       from assessments a cross join org
       where a.organisation_id = org.id and a.status = 'signed'
       order by a.gate_id, coalesce(a.visited_on, a.created_at) desc, a.id desc`;
}
