/**
 * Read-only bases for the archive, history, impact and document readers: the assessments of
 * one organisation (alias `a`), optionally joined to their gate (`g`), site (`s`) and client
 * (`c`). Readers add their own filters and columns; nothing here or there writes. Writes go
 * through the lifecycle functions of this module only.
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
