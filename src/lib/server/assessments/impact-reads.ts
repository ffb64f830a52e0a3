/**
 * What ruleset impact (impact.ts) reads of the archive: the ids of the signed assessments of one
 * version it re-scores (one statement for the whole run), those rows by id, a slice at a time,
 * and how each rule stood in their signed results. Read only.
 *
 * `basis: 'latest'` keeps each gate's most recent signed assessment of the family only (a gate
 * already signed under a later one of the family is left out); `basis: 'all'` keeps every one.
 */
import type { Knex } from 'knex';
import type { ImpactBasis, ImpactTarget, ResponsibleRule } from '@/lib/api/impact';
import type { Finding, GateForScoring } from '@/lib/rules';
import type { AssessmentDocuments } from '../assessment-input';
import { archiveDateSql } from '../archive-filters';

type Verdict = 'clear' | 'remedy' | 'withdraw';

/** One signed assessment to re-score, with what the impact list shows of its gate and client. */
export interface ImpactRow {
  id: string;
  gate_id: string;
  gate_label: string;
  gate_kind: string;
  client_name: string;
  address_line1: string;
  city: string;
  archive_date: Date;
  signed_at: Date | null;
  verdict: Verdict;
  answers: AssessmentDocuments['answers'];
  measurements: AssessmentDocuments['measurements'];
  observations: AssessmentDocuments['observations'];
  gate_snapshot: (Partial<GateForScoring> & { site?: { usageClass?: number } }) | null;
}

/** Which signed assessments: the organisation's, signed under `versionId`, of `target`'s family. */
export interface RescoreScope {
  organisationId: string;
  target: ImpactTarget;
  versionId: string;
  basis: ImpactBasis;
}

/** Each rule's outcome and severity in a signed result, by rule id. */
export type SignedRuleOutcomes = Record<string, [ResponsibleRule['before'], Finding['severity']]>;

/** The signed assessments of one version the impact considers (alias `a`; see the module comment for `basis`). */
function signedAssessmentsToRescore(knex: Knex, scope: RescoreScope): Knex.QueryBuilder {
  const { organisationId, target, versionId, basis } = scope;
  const familyVersionIds = [target.id, ...target.otherVersions.map((v) => v.id)];
  const query = knex('assessments as a')
    .where({ 'a.organisation_id': organisationId, 'a.ruleset_version_id': versionId, 'a.status': 'signed' })
    .whereNotNull('a.verdict');
  if (basis === 'latest') {
    // The gate's most recent signed assessment of this family is this one.
    query.whereNotExists(
      knex('assessments as later')
        .whereRaw('later.organisation_id = a.organisation_id and later.gate_id = a.gate_id')
        .andWhere('later.status', 'signed')
        .whereIn('later.ruleset_version_id', familyVersionIds)
        .andWhereRaw(`(coalesce(later.visited_on, later.created_at), later.id) > (${archiveDateSql}, a.id)`)
        .select(knex.raw('1')),
    );
  }
  return query;
}

/**
 * The ids of every assessment to re-score in `scope`, in id order: one statement, ids only.
 * `latest` takes each gate's most recent signed assessment of the family (one pass over the
 * organisation's signed rows of the family, sorted by gate) and keeps those under `versionId`.
 */
export async function idsToRescore(knex: Knex, scope: RescoreScope): Promise<string[]> {
  const { organisationId, target, versionId, basis } = scope;
  if (basis === 'all') {
    const rows = (await knex('assessments as a')
      .where({ 'a.organisation_id': organisationId, 'a.ruleset_version_id': versionId, 'a.status': 'signed' })
      .whereNotNull('a.verdict')
      .orderBy('a.id')
      .select('a.id')) as { id: string }[];
    return rows.map((r) => r.id);
  }
  const familyVersionIds = [target.id, ...target.otherVersions.map((v) => v.id)];
  const latest = knex('assessments as a')
    .where({ 'a.organisation_id': organisationId, 'a.status': 'signed' })
    .whereIn('a.ruleset_version_id', familyVersionIds)
    .distinctOn('a.gate_id')
    .orderByRaw(`a.gate_id, ${archiveDateSql} desc, a.id desc`)
    .select('a.id', 'a.ruleset_version_id', 'a.verdict');
  const rows = (await knex
    .from(latest.as('latest'))
    .where('latest.ruleset_version_id', versionId)
    .whereNotNull('latest.verdict')
    .orderBy('latest.id')
    .select('latest.id')) as { id: string }[];
  return rows.map((r) => r.id);
}

/** What the impact reads of each assessment it re-scores: its inputs and what the list shows. */
function rescoreColumns(knex: Knex) {
  return [
    'a.id',
    'a.gate_id',
    'g.label as gate_label',
    'g.kind as gate_kind',
    'c.name as client_name',
    's.address_line1',
    's.city',
    knex.raw(`${archiveDateSql} as archive_date`),
    'a.signed_at',
    'a.verdict',
    'a.answers',
    'a.measurements',
    'a.observations',
    'a.gate_snapshot',
  ];
}

/**
 * The assessments `ids` (chosen by `idsToRescore`), id order, with their gate, site and client:
 * primary-key reads of those rows alone. The scope's organisation, version and signed state are
 * checked again, so a slice can never read another organisation's rows or an unsigned one.
 */
export async function rescoreRowsByIds(
  knex: Knex,
  scope: RescoreScope & { ids: string[] },
): Promise<ImpactRow[]> {
  if (!scope.ids.length) return [];
  return (await knex('assessments as a')
    .join('gates as g', 'g.id', 'a.gate_id')
    .join('sites as s', 's.id', 'g.site_id')
    .join('clients as c', 'c.id', 's.client_id')
    .whereRaw('a.id = any(?::uuid[])', [scope.ids])
    .andWhere({
      'a.organisation_id': scope.organisationId,
      'a.ruleset_version_id': scope.versionId,
      'a.status': 'signed',
    })
    .whereNotNull('a.verdict')
    .orderBy('a.id')
    .select(rescoreColumns(knex))) as ImpactRow[];
}

/**
 * The assessments to re-score with ids in (afterId, upToId], id order, with their gate, site and
 * client: how slices queued before they carried their ids are read.
 */
export async function rescoreRowsInRange(
  knex: Knex,
  range: RescoreScope & { afterId: string | null; upToId: string },
): Promise<ImpactRow[]> {
  const query = signedAssessmentsToRescore(knex, range)
    .join('gates as g', 'g.id', 'a.gate_id')
    .join('sites as s', 's.id', 'g.site_id')
    .join('clients as c', 'c.id', 's.client_id')
    .andWhere('a.id', '<=', range.upToId);
  if (range.afterId) query.andWhere('a.id', '>', range.afterId);
  return (await query.orderBy('a.id').select(rescoreColumns(knex))) as ImpactRow[];
}

/** How each rule stood in the signed results of these assessments, by assessment id. */
export async function signedRuleOutcomes(
  knex: Knex,
  ids: string[],
): Promise<Map<string, SignedRuleOutcomes>> {
  if (!ids.length) return new Map();
  const rows = await knex('assessments as a')
    .whereRaw('a.id = any(?::uuid[])', [ids])
    .select(
      'a.id',
      knex.raw(
        `(select jsonb_object_agg(f ->> 'ruleId', jsonb_build_array(f ->> 'outcome', f ->> 'severity')) from jsonb_array_elements(a.result -> 'findings') f) as old_outcomes`,
      ),
    );
  return new Map(
    rows.map((r: { id: string; old_outcomes: SignedRuleOutcomes | null }) => [r.id, r.old_outcomes ?? {}]),
  );
}
