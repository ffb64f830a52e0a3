/**
 * Ruleset storage: families and their versions in PostgreSQL. A family is shipped (no
 * organisation: the files in rulesets/) or an organisation's own local family of amendments.
 * A published version is immutable (enforced by a trigger as well as here); publishing the same
 * file twice is a no-op, and a changed file under an already-published version number is refused.
 *
 * Reading is scoped: an organisation sees the shipped families and its own; a family slug names
 * its own family first, else the shipped one; drafts are seen by its staff only. Anything else
 * reads as not found.
 */
import type { Knex } from 'knex';
import type {
  RulesetFamilySummary,
  RulesetStatus,
  RulesetVersionDetail,
  RulesetVersionSummary,
  ScoreRequest,
} from '@/lib/api/rulesets';
import {
  AssessmentInputError,
  compileRuleset,
  diffRulesets,
  resultJson,
  scoreParsed,
  type LoadedRuleset,
  type RulesetDiff,
  type RulesetVersion,
  type ScoreResult,
} from '@/lib/rules';
import { db } from './db';
import { InvalidInputError } from './errors';
import { iso } from './listing';
import { loadedRuleset } from './ruleset-cache';
import type { SessionUser } from './session-user';

export interface RulesetVersionToPublish {
  family: string;
  title: string;
  region?: string | null;
  version: string;
  content: unknown;
  contentSha256: string;
}

export class RulesetConflictError extends Error {
  constructor(
    readonly family: string,
    readonly version: string,
  ) {
    super(
      `ruleset ${family} ${version} is already published with different content; publish it under a new version number`,
    );
  }
}

/** Publishes a shipped (organisation-less) version; returns 'published' or 'unchanged'. */
export async function publishShippedVersion(
  v: RulesetVersionToPublish,
  knex: Knex = db(),
): Promise<'published' | 'unchanged'> {
  return knex.transaction(async (trx) => {
    await trx.raw('select pg_advisory_xact_lock(hashtext(?))', [`ruleset:${v.family}`]);
    let ruleset = await trx('rulesets')
      .whereNull('organisation_id')
      .andWhere({ family: v.family })
      .first('id');
    if (!ruleset) {
      [ruleset] = await trx('rulesets')
        .insert({ family: v.family, title: v.title, region: v.region ?? null })
        .returning('id');
    }
    const existing = await trx('ruleset_versions')
      .where({ ruleset_id: ruleset.id, version: v.version })
      .first('id', 'content_sha256', 'status');
    if (existing) {
      if (existing.content_sha256 === v.contentSha256) return 'unchanged';
      if (existing.status !== 'draft') throw new RulesetConflictError(v.family, v.version);
      await trx('ruleset_versions')
        .where({ id: existing.id })
        .update({ content: JSON.stringify(v.content), content_sha256: v.contentSha256 });
      await trx('ruleset_versions')
        .where({ id: existing.id })
        .update({ status: 'published', published_at: trx.fn.now() });
      return 'published';
    }
    await trx('ruleset_versions').insert({
      ruleset_id: ruleset.id,
      version: v.version,
      content: JSON.stringify(v.content),
      content_sha256: v.contentSha256,
      status: 'published',
      published_at: trx.fn.now(),
    });
    return 'published';
  });
}

// ---------------------------------------------------------------------------------------------
// Reading

/** A family as stored. */
export interface FamilyRow {
  id: string;
  organisation_id: string | null;
  family: string;
  title: string;
  region: string | null;
  based_on_family: string | null;
}

interface VersionRow {
  id: string;
  ruleset_id: string;
  version: string;
  status: RulesetStatus;
  published_at: Date | null;
  created_at: Date;
  content_sha256: string;
  derived_from_version_id: string | null;
  effective_from: string;
  rule_count: number;
  enabled_rule_count: number;
  local_rule_count: number;
  derived_family: string | null;
  derived_version: string | null;
}

const familyColumns = [
  'r.id',
  'r.organisation_id',
  'r.family',
  'r.title',
  'r.region',
  'r.based_on_family',
] as const;

function versionColumns(knex: Knex): (string | Knex.Raw)[] {
  return [
    'rv.id',
    'rv.ruleset_id',
    'rv.version',
    'rv.status',
    'rv.published_at',
    'rv.created_at',
    'rv.content_sha256',
    'rv.derived_from_version_id',
    knex.raw(`rv.content ->> 'effectiveFrom' as effective_from`),
    knex.raw(`jsonb_array_length(rv.content -> 'rules') as rule_count`),
    knex.raw(
      `(select count(*)::int from jsonb_array_elements(rv.content -> 'rules') as rule where rule ->> 'enabled' = 'true') as enabled_rule_count`,
    ),
    knex.raw(
      `(select count(*)::int from jsonb_array_elements(rv.content -> 'rules') as rule where rule ->> 'local' = 'true') as local_rule_count`,
    ),
    knex.raw(`rv.content -> 'derivedFrom' ->> 'family' as derived_family`),
    knex.raw(`rv.content -> 'derivedFrom' ->> 'version' as derived_version`),
  ];
}

/** Staff see their organisation's drafts; a homeowner only what has been published. */
export function seesDrafts(viewer: SessionUser): boolean {
  return viewer.role !== 'homeowner';
}

/** Families the viewer's organisation may read: the shipped ones and its own. */
function visibleFamilies(knex: Knex, viewer: SessionUser): Knex.QueryBuilder {
  return knex('rulesets as r').where((w) =>
    w.whereNull('r.organisation_id').orWhere('r.organisation_id', viewer.organisationId),
  );
}

/** Versions of one family the viewer may read. */
function visibleVersionsOf(knex: Knex, viewer: SessionUser, family: FamilyRow): Knex.QueryBuilder {
  const statuses: RulesetStatus[] =
    family.organisation_id && seesDrafts(viewer)
      ? ['draft', 'published', 'retired']
      : ['published', 'retired'];
  return knex('ruleset_versions as rv').where('rv.ruleset_id', family.id).whereIn('rv.status', statuses);
}

/** The family a slug names for this viewer: their organisation's own first, else the shipped one. */
export async function resolveFamily(
  viewer: SessionUser,
  family: string,
  knex: Knex = db(),
): Promise<FamilyRow | undefined> {
  return visibleFamilies(knex, viewer)
    .andWhere('r.family', family)
    .orderByRaw('r.organisation_id is null')
    .first<FamilyRow | undefined>(familyColumns);
}

function toSummary(row: VersionRow): RulesetVersionSummary {
  return {
    version: row.version,
    status: row.status,
    publishedAt: row.published_at ? iso(row.published_at) : null,
    createdAt: iso(row.created_at),
    contentSha256: row.content_sha256,
    effectiveFrom: row.effective_from,
    ruleCount: Number(row.rule_count),
    enabledRuleCount: Number(row.enabled_rule_count),
    localRuleCount: Number(row.local_rule_count),
    derivedFrom:
      row.derived_family && row.derived_version
        ? { family: row.derived_family, version: row.derived_version }
        : null,
  };
}

/** Drafts first (newest first), then published and retired versions, newest first. */
const versionOrder = `case when rv.status = 'draft' then 0 else 1 end, coalesce(rv.published_at, rv.created_at) desc, rv.created_at desc`;

/** Every family the organisation can use, shipped ones first, with its versions. */
export async function listVisibleFamilies(
  viewer: SessionUser,
  knex: Knex = db(),
): Promise<RulesetFamilySummary[]> {
  const families = await visibleFamilies(knex, viewer)
    .orderByRaw('r.organisation_id is not null, r.family')
    .select<FamilyRow[]>(familyColumns);
  if (families.length === 0) return [];
  const byFamily = new Map(families.map((f) => [f.id, [] as VersionRow[]]));
  const rows = await knex('ruleset_versions as rv')
    .whereIn(
      'rv.ruleset_id',
      families.map((f) => f.id),
    )
    .andWhere((w) => {
      w.whereIn('rv.status', ['published', 'retired']);
      if (seesDrafts(viewer))
        w.orWhere((d) =>
          d.where('rv.status', 'draft').whereIn(
            'rv.ruleset_id',
            families.filter((f) => f.organisation_id).map((f) => f.id),
          ),
        );
    })
    .orderByRaw(versionOrder)
    .select<VersionRow[]>(versionColumns(knex));
  for (const row of rows) byFamily.get(row.ruleset_id)?.push(row);
  return families.map((f) => {
    const versions = (byFamily.get(f.id) ?? []).map(toSummary);
    return {
      family: f.family,
      title: f.title,
      region: f.region,
      local: f.organisation_id !== null,
      basedOnFamily: f.based_on_family,
      current: currentOf(versions),
      versions,
    };
  });
}

/** The latest published version in a list ordered as versionOrder orders it. */
function currentOf(versions: readonly RulesetVersionSummary[]): string | null {
  return versions.find((v) => v.status === 'published')?.version ?? null;
}

/** A stored version with its family, for reading and for the amendment lifecycle. */
export interface StoredVersion {
  id: string;
  family: FamilyRow;
  summary: RulesetVersionSummary;
}

/** One version the viewer may read, without its content; null when it is not theirs to see. */
export async function findVersion(
  viewer: SessionUser,
  family: string,
  version: string,
  knex: Knex = db(),
): Promise<StoredVersion | null> {
  const familyRow = await resolveFamily(viewer, family, knex);
  if (!familyRow) return null;
  const row = await visibleVersionsOf(knex, viewer, familyRow)
    .andWhere('rv.version', version)
    .first<VersionRow | undefined>(versionColumns(knex));
  return row ? { id: row.id, family: familyRow, summary: toSummary(row) } : null;
}

/** The family's current version: the latest published one. */
export async function findCurrentVersion(
  viewer: SessionUser,
  family: string,
  knex: Knex = db(),
): Promise<StoredVersion | null> {
  const familyRow = await resolveFamily(viewer, family, knex);
  if (!familyRow) return null;
  const row = await knex('ruleset_versions as rv')
    .where({ 'rv.ruleset_id': familyRow.id, 'rv.status': 'published' })
    .orderBy([
      { column: 'rv.published_at', order: 'desc' },
      { column: 'rv.created_at', order: 'desc' },
    ])
    .first<VersionRow | undefined>(versionColumns(knex));
  return row ? { id: row.id, family: familyRow, summary: toSummary(row) } : null;
}

/** The stored document of a version, loaded and validated once per content (process cache). */
export async function loadVersion(
  stored: Pick<StoredVersion, 'id' | 'summary'>,
  knex: Knex = db(),
): Promise<LoadedRuleset> {
  return loadedRuleset(stored.summary.contentSha256, async () => {
    const row = await knex('ruleset_versions')
      .where({ id: stored.id })
      .first<{ content: unknown } | undefined>('content');
    if (!row) throw new Error(`ruleset version ${stored.id} disappeared while loading`);
    return row.content;
  });
}

/** A whole version: its summary and its document (sources, areas, questions, rules). */
export async function getVersionDetail(
  viewer: SessionUser,
  family: string,
  version: string,
): Promise<RulesetVersionDetail | null> {
  const stored = await findVersion(viewer, family, version);
  return stored ? detailOf(stored) : null;
}

export async function detailOf(stored: StoredVersion): Promise<RulesetVersionDetail> {
  const loaded = await loadVersion(stored);
  return {
    ...stored.summary,
    family: stored.family.family,
    familyTitle: loaded.version.familyTitle,
    local: stored.family.organisation_id !== null,
    content: loaded.version,
  };
}

/** What changed from one version to another (in the same family unless `fromFamily` says otherwise); null when either is not visible. */
export async function diffVersions(
  viewer: SessionUser,
  family: string,
  query: { from: string; to: string; fromFamily?: string },
): Promise<{ diff: RulesetDiff; from: RulesetVersionDetail; to: RulesetVersionDetail } | null> {
  const [fromStored, toStored] = await Promise.all([
    findVersion(viewer, query.fromFamily ?? family, query.from),
    findVersion(viewer, family, query.to),
  ]);
  if (!fromStored || !toStored) return null;
  const [from, to] = await Promise.all([detailOf(fromStored), detailOf(toStored)]);
  return { diff: diffRulesets(from.content, to.content), from, to };
}

// ---------------------------------------------------------------------------------------------
// Scoring previews

/**
 * Scores an input against the family's current version or the named one (a draft included, for
 * its owner's preview) and gives the result as the endpoint answers it: the JSON text
 * JSON.stringify(result) writes, written by resultJson (each rule's text, most of a result's
 * bytes, once per version). A family or version the viewer cannot see is a field error; an input
 * that does not fit the version is a 422 naming each field under `input.`.
 */
export async function scorePreviewJson(viewer: SessionUser, request: ScoreRequest): Promise<string> {
  const { result, loaded } = await scorePreview(viewer, request);
  return resultJson(result, compileRuleset(loaded.version, loaded.contentSha256));
}

async function scorePreview(
  viewer: SessionUser,
  request: ScoreRequest,
): Promise<{ result: ScoreResult; loaded: LoadedRuleset }> {
  const target = await findScorableVersion(viewer, request.family, request.version);
  if (!target) {
    const family = await resolveFamily(viewer, request.family);
    if (family && request.version) {
      throw InvalidInputError.field(
        'version',
        `no version "${request.version}" of "${request.family}" that you can see`,
      );
    }
    invalidFamily(request.family, family);
  }
  const loaded = await loadedRuleset(
    target.content_sha256,
    async () => (await db()('ruleset_versions').where({ id: target.id }).first('content'))?.content,
  );
  try {
    return { result: scoreParsed(request.input, loaded), loaded };
  } catch (error) {
    if (!(error instanceof AssessmentInputError)) throw error;
    throw new InvalidInputError(
      `The input does not fit ${loaded.version.family} ${loaded.version.version}.`,
      error.issues.map((issue) => ({ field: `input.${issue.path}`, message: issue.message })),
    );
  }
}

/**
 * The version a preview scores against, in one small query that never touches the content
 * (the cache holds that): the family the slug names for this viewer, then the named version
 * (drafts of the organisation's own family included) or the latest published one.
 */
async function findScorableVersion(
  viewer: SessionUser,
  family: string,
  version: string | undefined,
): Promise<{ id: string; content_sha256: string } | undefined> {
  const knex = db();
  const named = version
    ? `and rv.version = ? and (rv.status in ('published', 'retired') or (rv.status = 'draft' and f.organisation_id is not null and ?))`
    : `and rv.status = 'published'`;
  const { rows } = await knex.raw(
    `with f as (
       select id, organisation_id from rulesets
        where family = ? and (organisation_id = ? or organisation_id is null)
        order by organisation_id is null limit 1)
     select rv.id, rv.content_sha256 from ruleset_versions rv join f on f.id = rv.ruleset_id
      where true ${named}
      order by rv.published_at desc nulls last, rv.created_at desc limit 1`,
    version ? [family, viewer.organisationId, version, seesDrafts(viewer)] : [family, viewer.organisationId],
  );
  return rows[0];
}

function invalidFamily(family: string, known: FamilyRow | undefined): never {
  const message = known
    ? `"${family}" has no published version yet`
    : `no ruleset family "${family}" that you can see`;
  throw InvalidInputError.field('family', message);
}

/** The parsed document of a version by its row id (the amendment lifecycle's baseline). */
export async function contentById(id: string, knex: Knex = db()): Promise<RulesetVersion | null> {
  const row = await knex('ruleset_versions')
    .where({ id })
    .first<{ content: RulesetVersion; content_sha256: string } | undefined>('content', 'content_sha256');
  if (!row) return null;
  return (await loadedRuleset(row.content_sha256, async () => row.content)).version;
}
