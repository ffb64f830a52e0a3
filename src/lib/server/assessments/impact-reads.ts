/**
 * What ruleset impact (impact.ts) reads of the archive: the signed assessments of one version it
 * re-scores, in keyset ranges of ids, and how each rule stood in their signed results. Read
 * only; the queries and the indexes they use are those impact.ts has always run.
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
 * The last id of the next `size` assessments to re-score after `afterId` (from the first when
 * null), in id order, reading ids only; null when none are left.
 */
export async function lastIdOfRescorePage(
  knex: Knex,
  scope: RescoreScope,
  afterId: string | null,
  size: number,
): Promise<string | null> {
  const query = signedAssessmentsToRescore(knex, scope);
  if (afterId) query.andWhere('a.id', '>', afterId);
  const [last] = (await knex
    .from(query.orderBy('a.id').limit(size).select('a.id').as('page'))
    .orderBy('id', 'desc')
    .limit(1)
    .select('id')) as { id: string }[];
  return last?.id ?? null;
}

/** The assessments to re-score with ids in (afterId, upToId], id order, with their gate, site and client. */
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
  return (await query
    .orderBy('a.id')
    .select(
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
    )) as ImpactRow[];
}

/** How each rule stood in the signed results of these assessments, by assessment id. */
export async function signedRuleOutcomes(
  knex: Knex,
  ids: string[],
): Promise<Map<string, SignedRuleOutcomes>> {
  if (!ids.length) return new Map();
  const rows = await knex('assessments as a')
    .whereIn('a.id', ids)
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
