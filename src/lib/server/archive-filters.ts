/**
 * The archive's base query and its filters, shared by the list, the count and the export so
 * they always mean the same rows. Text filters go through id sub-queries that the trigram
 * indexes answer (gate label, site address, client name), so a rare word does not scan the
 * organisation's whole history, and a common one still lets the date index drive the order.
 */
import type { Knex } from 'knex';
import type { ArchiveFilter } from '@/lib/api/archive';
import { containsPattern } from './listing';

/**
 * A site's address as one searchable string. The archive migration trigram-indexes exactly this
 * expression (without the alias), so keep the two in step.
 */
export const archiveAddressSql = (alias: string) => `(${alias}.address_line1 || ' ' || ${alias}.city || ' ' || coalesce(${alias}.postal_code, ''))`;

/** The date an archived assessment is filed under: its visit, or when a draft was started. */
export const archiveDateSql = 'coalesce(a.visited_on, a.created_at)';

/**
 * Every assessment of the organisation with what the archive shows about it. The signed
 * report is at most one row per assessment (unique index), so the left join never multiplies.
 */
export function archiveBase(knex: Knex, organisationId: string): Knex.QueryBuilder {
  return knex('assessments as a')
    .join('gates as g', 'g.id', 'a.gate_id')
    .join('sites as s', 's.id', 'g.site_id')
    .join('clients as c', 'c.id', 's.client_id')
    .join('users as u', 'u.id', 'a.auditor_id')
    .join('ruleset_versions as rv', 'rv.id', 'a.ruleset_version_id')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .leftJoin('documents as d', (j) => j.on('d.assessment_id', 'a.id').andOnVal('d.kind', 'signed_report'))
    .where('a.organisation_id', organisationId);
}

/** Applies the filters to a query built on archiveBase. Dates are days in `timeZone`. */
export function applyArchiveFilter(query: Knex.QueryBuilder, knex: Knex, organisationId: string, filter: ArchiveFilter, timeZone: string): Knex.QueryBuilder {
  if (filter.q) {
    const pattern = containsPattern(filter.q);
    query.whereRaw(
      `a.gate_id in (
         select g2.id from gates g2 where g2.organisation_id = ? and g2.label ilike ?
         union
         select g3.id from gates g3 join sites s3 on s3.id = g3.site_id where s3.organisation_id = ? and ${archiveAddressSql('s3')} ilike ?
         union
         select g4.id from gates g4 join sites s4 on s4.id = g4.site_id join clients c4 on c4.id = s4.client_id where c4.organisation_id = ? and c4.name ilike ?)`,
      [organisationId, pattern, organisationId, pattern, organisationId, pattern],
    );
  }
  if (filter.client) {
    query.whereIn('s.client_id', knex('clients').where('organisation_id', organisationId).andWhereILike('name', containsPattern(filter.client)).select('id'));
  }
  if (filter.clientId) query.andWhere('s.client_id', filter.clientId);
  if (filter.address) {
    query.whereIn('g.site_id', knex('sites').where('organisation_id', organisationId).andWhereRaw(`${archiveAddressSql('sites')} ilike ?`, [containsPattern(filter.address)]).select('id'));
  }
  if (filter.gateKind) query.andWhere('g.kind', filter.gateKind);
  if (filter.usageClass) query.andWhere('s.usage_class', filter.usageClass);
  if (filter.status) query.andWhere('a.status', filter.status);
  if (filter.verdict) query.andWhere('a.verdict', filter.verdict);
  if (filter.family || filter.version) {
    const versions = knex('ruleset_versions as rv2').join('rulesets as r2', 'r2.id', 'rv2.ruleset_id').select('rv2.id');
    versions.where((w) => w.where('r2.organisation_id', organisationId).orWhereNull('r2.organisation_id'));
    if (filter.family) versions.andWhere('r2.family', filter.family);
    if (filter.version) versions.andWhere('rv2.version', filter.version);
    query.whereIn('a.ruleset_version_id', versions);
  }
  if (filter.auditorId) query.andWhere('a.auditor_id', filter.auditorId);
  if (filter.gateId) query.andWhere('a.gate_id', filter.gateId);
  if (filter.from) query.andWhereRaw(`${archiveDateSql} >= (?::date)::timestamp at time zone ?`, [filter.from, timeZone]);
  if (filter.to) query.andWhereRaw(`${archiveDateSql} < (?::date + 1)::timestamp at time zone ?`, [filter.to, timeZone]);
  return query;
}

/** Only the filter keys of a larger query object (the list's paging keys are dropped). */
export function filterOf<Q extends ArchiveFilter>(query: Q): ArchiveFilter {
  const { q, client, clientId, address, gateKind, usageClass, status, verdict, family, version, auditorId, gateId, from, to } = query;
  return { q, client, clientId, address, gateKind, usageClass, status, verdict, family, version, auditorId, gateId, from, to };
}
