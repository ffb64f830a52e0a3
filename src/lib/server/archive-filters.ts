/**
 * The archive's base query and its filters, shared by the list, the count and the export so
 * they always mean the same rows.
 *
 * The base joins only what filters and sorts need (assessment, gate, site, client); the
 * auditor's name, the ruleset and the signed PDF are looked up for the rows shown (archiveColumns),
 * which keeps planning cheap. Text filters (free text, client name, address) are first turned
 * into the matching gates with the trigram indexes; when few gates match, the list reads just
 * their assessments (gate index), and when many do, the date order drives and the gates are a
 * filter. Either way a rare word does not scan the organisation's whole history.
 */
import type { Knex } from 'knex';
import { organisationAssessmentsWithPlace } from './assessments';
import type { ArchiveFilter } from '@/lib/api/archive';
import { containsPattern } from './listing';

/**
 * A site's address as one searchable string. The archive migration trigram-indexes exactly this
 * expression (without the alias), so keep the two in step.
 */
export const archiveAddressSql = (alias: string) =>
  `(${alias}.address_line1 || ' ' || ${alias}.city || ' ' || coalesce(${alias}.postal_code, ''))`;

/** The date an archived assessment is filed under: its visit, or when a draft was started. */
export const archiveDateSql = 'coalesce(a.visited_on, a.created_at)';

/**
 * Up to this many gates matched by text, the list reads their assessments directly (about five
 * each) and sorts them; with more, walking the date index finds a page sooner. Around the
 * square root of (page size × gates ÷ visits per gate) for a 20,000-gate archive.
 */
const FEW_GATES = 300;

/** Every assessment of the organisation with its gate, site and client. */
export function archiveBase(knex: Knex, organisationId: string): Knex.QueryBuilder {
  return organisationAssessmentsWithPlace(knex, organisationId);
}

const uuidArray = (ids: string[]) => `{${ids.join(',')}}`;

/**
 * The gates the text filters match: their ids when there are at most FEW_GATES, `'many'` when
 * the words are common, null when there is no text filter. Each word is first looked up where
 * its trigram index is (gate labels, site addresses, client names), a capped handful of rows each.
 */
async function textMatchedGates(
  knex: Knex,
  organisationId: string,
  filter: ArchiveFilter,
): Promise<string[] | 'many' | null> {
  if (!filter.q && !filter.client && !filter.address) return null;
  const cap = FEW_GATES + 1;
  const ids = async (
    table: 'gates' | 'sites' | 'clients',
    condition: string,
    text: string,
  ): Promise<string[]> =>
    (await knex(table)
      .where('organisation_id', organisationId)
      .andWhereRaw(`${condition} ilike ?`, [containsPattern(text)])
      .limit(cap)
      .pluck('id')) as string[];
  const [labelGates, qSites, qClients, clients, sites] = await Promise.all([
    filter.q ? ids('gates', 'label', filter.q) : [],
    filter.q ? ids('sites', archiveAddressSql('sites'), filter.q) : [],
    filter.q ? ids('clients', 'name', filter.q) : [],
    filter.client ? ids('clients', 'name', filter.client) : [],
    filter.address ? ids('sites', archiveAddressSql('sites'), filter.address) : [],
  ]);
  if ([labelGates, qSites, qClients, clients, sites].some((list) => list.length >= cap)) return 'many';
  const gates = knex('gates as tg').where('tg.organisation_id', organisationId);
  const sitesOf = (clientIds: string[]) =>
    knex('sites')
      .where('organisation_id', organisationId)
      .andWhereRaw('client_id = any(?::uuid[])', [uuidArray(clientIds)])
      .select('id');
  if (filter.q) {
    // Three index lookups, not one OR that would read every gate.
    gates.whereRaw(
      `tg.id in (
         select id from gates where organisation_id = ? and id = any(?::uuid[])
         union select id from gates where organisation_id = ? and site_id = any(?::uuid[])
         union select g5.id from gates g5 join sites s5 on s5.id = g5.site_id where s5.organisation_id = ? and s5.client_id = any(?::uuid[]))`,
      [
        organisationId,
        uuidArray(labelGates),
        organisationId,
        uuidArray(qSites),
        organisationId,
        uuidArray(qClients),
      ],
    );
  }
  if (filter.client) gates.whereIn('tg.site_id', sitesOf(clients));
  if (filter.address) gates.andWhereRaw('tg.site_id = any(?::uuid[])', [uuidArray(sites)]);
  const found = (await gates.limit(cap).pluck('tg.id')) as string[];
  return found.length >= cap ? 'many' : found;
}

/**
 * Adds the filters to a query built on archiveBase, in place. Dates are days in `timeZone`.
 * Text filters cost one small query first (see the module comment). (It resolves to nothing:
 * a promise resolving to a query builder would run the query, builders being thenable.)
 */
export async function applyArchiveFilter(
  query: Knex.QueryBuilder,
  knex: Knex,
  organisationId: string,
  filter: ArchiveFilter,
  timeZone: string,
): Promise<void> {
  const gates = await textMatchedGates(knex, organisationId, filter);
  // An array literal, not a JS array: knex would spread an array binding into a list.
  if (Array.isArray(gates)) query.whereRaw('a.gate_id = any(?::uuid[])', [uuidArray(gates)]);
  else if (gates === 'many') {
    // Common words: test each row on the way down the date index; a page is found in a few hundred rows.
    if (filter.q) {
      const pattern = containsPattern(filter.q);
      query.whereRaw(`(g.label ilike ? or ${archiveAddressSql('s')} ilike ? or c.name ilike ?)`, [
        pattern,
        pattern,
        pattern,
      ]);
    }
    if (filter.client) query.andWhereILike('c.name', containsPattern(filter.client));
    if (filter.address)
      query.andWhereRaw(`${archiveAddressSql('s')} ilike ?`, [containsPattern(filter.address)]);
  }
  if (filter.clientId) query.andWhere('s.client_id', filter.clientId);
  if (filter.gateKind) query.andWhere('g.kind', filter.gateKind);
  if (filter.usageClass) query.andWhere('s.usage_class', filter.usageClass);
  if (filter.status) query.andWhere('a.status', filter.status);
  if (filter.verdict) query.andWhere('a.verdict', filter.verdict);
  if (filter.family || filter.version) {
    const versions = knex('ruleset_versions as rv2')
      .join('rulesets as r2', 'r2.id', 'rv2.ruleset_id')
      .select('rv2.id');
    versions.where((w) => w.where('r2.organisation_id', organisationId).orWhereNull('r2.organisation_id'));
    if (filter.family) versions.andWhere('r2.family', filter.family);
    if (filter.version) versions.andWhere('rv2.version', filter.version);
    query.whereIn('a.ruleset_version_id', versions);
  }
  if (filter.auditorId) query.andWhere('a.auditor_id', filter.auditorId);
  if (filter.gateId) query.andWhere('a.gate_id', filter.gateId);
  if (filter.from)
    query.andWhereRaw(`${archiveDateSql} >= (?::date)::timestamp at time zone ?`, [filter.from, timeZone]);
  if (filter.to)
    query.andWhereRaw(`${archiveDateSql} < (?::date + 1)::timestamp at time zone ?`, [filter.to, timeZone]);
}

/** Looked up for the rows shown only: who audited, under which ruleset version, and the signed PDF. */
export const archiveLookups = (knex: Knex) => [
  knex.raw('(select u.name from users u where u.id = a.auditor_id) as auditor_name'),
  knex.raw(
    '(select r.family from ruleset_versions rv join rulesets r on r.id = rv.ruleset_id where rv.id = a.ruleset_version_id) as family',
  ),
  knex.raw('(select rv.version from ruleset_versions rv where rv.id = a.ruleset_version_id) as version'),
];
