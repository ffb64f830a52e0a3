/**
 * Local amendments, stored: an owner derives a draft from a published version into the
 * organisation's own family, edits it (ruleset-edits.ts decides the new document, validateRuleset
 * judges it), publishes it as an immutable version, or deletes the draft. Each step runs in one
 * transaction with the row locked and writes its audit event there.
 *
 * The files in rulesets/ stay the shipped baseline: nothing here touches a shipped family.
 */
import type { Knex } from 'knex';
import {
  FamilySlugSchema,
  type AmendmentCreate,
  type AmendmentPatch,
  type AmendmentProblem,
  type RulesetVersionDetail,
} from '@/lib/api/rulesets';
import { validateRuleset, type LoadedRuleset, type RulesetProblem, type RulesetVersion } from '@/lib/rules';
import { queueImpactAfterPublish } from './impact-runs';
import { recordAudit } from './audit';
import { db } from './db';
import { ConflictError, InvalidInputError, NotFoundError } from './errors';
import { FOREIGN_KEY_VIOLATION, pgErrorCode } from './listing';
import { loadedRuleset } from './ruleset-cache';
import { amendmentContent, applyAmendment, localFamilyTitle, nextLocalVersionLabel } from './ruleset-edits';
import {
  contentById,
  findVersion,
  getVersionDetail,
  loadVersion,
  type FamilyRow,
  type StoredVersion,
} from './rulesets';
import type { SessionOrganisation, SessionUser } from './session-user';

export interface AmendmentSession {
  user: SessionUser;
  organisation: SessionOrganisation;
}

export interface RequestFacts {
  ip: string | null;
}

const invalid = InvalidInputError.field;

/** Detail of a version just written, read back after the commit. */
async function detailAfterCommit(
  user: SessionUser,
  family: string,
  version: string,
): Promise<RulesetVersionDetail> {
  const detail = await getVersionDetail(user, family, version);
  if (!detail) throw new Error(`ruleset ${family} ${version} vanished after it was written`);
  return detail;
}

/** Stores a validated document: the parsed form (trimmed text) is what is hashed and kept. */
function validated(content: RulesetVersion): LoadedRuleset {
  const checked = validateRuleset(content);
  if (!checked.ok)
    throw new Error(
      `an amendment copy failed validation: ${checked.problems.map((p) => `${p.path}: ${p.message}`).join('; ')}`,
    );
  return checked.ruleset;
}

/** Copies a published version into a new draft of the organisation's own family. */
export async function deriveAmendment(
  { user, organisation }: AmendmentSession,
  input: AmendmentCreate,
  request: RequestFacts,
): Promise<RulesetVersionDetail> {
  const written = await db().transaction(async (trx) => {
    const source = await findVersion(user, input.fromFamily, input.fromVersion, trx);
    if (!source) {
      const field = (await findFamilyOnly(trx, user, input.fromFamily)) ? 'fromVersion' : 'fromFamily';
      throw invalid(
        field,
        field === 'fromFamily'
          ? `no ruleset family "${input.fromFamily}" that you can see`
          : `no version "${input.fromVersion}" of "${input.fromFamily}"`,
      );
    }
    if (source.summary.status !== 'published')
      throw invalid(
        'fromVersion',
        `${input.fromVersion} is ${source.summary.status}; amendments start from a published version`,
      );

    const root = source.family.based_on_family ?? source.family.family;
    const slug =
      input.family ??
      (source.family.organisation_id ? source.family.family : `${source.family.family}-local`);
    if (!FamilySlugSchema.safeParse(slug).success)
      throw invalid('family', `"${slug}" is too long for a family name; give a shorter one`);
    if (await trx('rulesets').whereNull('organisation_id').andWhere({ family: slug }).first('id')) {
      throw invalid(
        'family',
        `"${slug}" is a shipped family; a local family needs a name of its own, such as "${slug}-local"`,
      );
    }
    await trx.raw('select pg_advisory_xact_lock(hashtext(?))', [`ruleset:${organisation.id}:${slug}`]);
    let target = await trx('rulesets')
      .where({ organisation_id: organisation.id, family: slug })
      .first<FamilyRow | undefined>('id', 'organisation_id', 'family', 'title', 'region', 'based_on_family');
    if (target && target.based_on_family !== root) {
      throw invalid(
        'family',
        `"${slug}" amends ${target.based_on_family ?? 'another family'}, not ${root}; pick another name`,
      );
    }
    const sourceDocument = (await loadVersion(source, trx)).version;
    const title =
      target?.title ??
      (source.family.organisation_id
        ? sourceDocument.familyTitle
        : localFamilyTitle(sourceDocument.familyTitle, organisation.name));
    if (!target) {
      [target] = await trx('rulesets')
        .insert({
          organisation_id: organisation.id,
          family: slug,
          title,
          region: source.family.region,
          based_on_family: root,
        })
        .returning(['id', 'organisation_id', 'family', 'title', 'region', 'based_on_family']);
    }
    const labels = (await trx('ruleset_versions')
      .where({ ruleset_id: target!.id })
      .pluck('version')) as string[];
    const label = nextLocalVersionLabel(source.summary.version, labels);
    const loaded = validated(
      amendmentContent(sourceDocument, source.summary.contentSha256, {
        family: slug,
        familyTitle: title,
        version: label,
      }),
    );
    const [{ id }] = await trx('ruleset_versions')
      .insert({
        ruleset_id: target!.id,
        version: label,
        content: JSON.stringify(loaded.version),
        content_sha256: loaded.contentSha256,
        status: 'draft',
        derived_from_version_id: source.id,
        created_by: user.id,
      })
      .returning('id');
    await recordAudit(trx, {
      organisationId: organisation.id,
      actorUserId: user.id,
      actorLabel: user.email,
      action: 'ruleset.amendment.derived',
      entityType: 'ruleset_version',
      entityId: id,
      ip: request.ip,
      detail: {
        family: slug,
        version: label,
        from: {
          family: source.family.family,
          version: source.summary.version,
          contentSha256: source.summary.contentSha256,
        },
      },
    });
    return { family: slug, version: label, loaded };
  });
  void loadedRuleset(written.loaded.contentSha256, async () => written.loaded.version);
  return detailAfterCommit(user, written.family, written.version);
}

async function findFamilyOnly(knex: Knex, user: SessionUser, family: string): Promise<boolean> {
  const row = await knex('rulesets')
    .where('family', family)
    .andWhere((w) => w.whereNull('organisation_id').orWhere('organisation_id', user.organisationId))
    .first('id');
  return Boolean(row);
}

interface LockedDraft {
  stored: StoredVersion;
  content: RulesetVersion;
  contentSha256: string;
  derivedFromVersionId: string | null;
}

/**
 * Finds one of the organisation's own versions and locks its row. A version it cannot see is a
 * 404; a shipped or already published one a 409 when `draftOnly`.
 */
async function lockOwnVersion(
  trx: Knex.Transaction,
  user: SessionUser,
  family: string,
  version: string,
  action: string,
): Promise<LockedDraft> {
  const stored = await findVersion(user, family, version, trx);
  if (!stored) throw new NotFoundError('That ruleset version');
  if (!stored.family.organisation_id) {
    throw new ConflictError(
      `${family} is a shipped family and cannot be ${action}; derive an amendment of it instead.`,
    );
  }
  const row = await trx('ruleset_versions').where({ id: stored.id }).forUpdate().first<{
    status: string;
    content: unknown;
    content_sha256: string;
    derived_from_version_id: string | null;
  }>('status', 'content', 'content_sha256', 'derived_from_version_id');
  if (row.status !== 'draft') {
    throw new ConflictError(
      `${family} ${version} is ${row.status}: a published version never changes. Derive a new amendment to change it.`,
    );
  }
  const loaded = await loadedRuleset(row.content_sha256, async () => row.content);
  return {
    stored,
    content: loaded.version,
    contentSha256: row.content_sha256,
    derivedFromVersionId: row.derived_from_version_id,
  };
}

/** Validation problems of the resulting document, as fields under `ruleset.` with the rule they concern. */
function documentProblems(problems: readonly RulesetProblem[], content: RulesetVersion): AmendmentProblem[] {
  return problems.map((p) => {
    const index = /^rules\[(\d+)\]/.exec(p.path)?.[1];
    const ruleId = index === undefined ? undefined : content.rules[Number(index)]?.id;
    return { field: `ruleset.${p.path}`, message: p.message, ...(ruleId ? { ruleId } : {}) };
  });
}

/** Applies an owner's changes to a draft; nothing is stored unless the whole result is valid. */
export async function amendDraft(
  { user, organisation }: AmendmentSession,
  family: string,
  version: string,
  patch: AmendmentPatch,
  request: RequestFacts,
): Promise<RulesetVersionDetail> {
  await db().transaction(async (trx) => {
    const draft = await lockOwnVersion(trx, user, family, version, 'edited');
    const baseline = draft.derivedFromVersionId ? await contentById(draft.derivedFromVersionId, trx) : null;
    const edit = applyAmendment(draft.content, patch, baseline);
    if (!edit.ok)
      throw new InvalidInputError('Some changes cannot be made; nothing was saved.', edit.problems);
    const checked = validateRuleset(edit.content);
    if (!checked.ok) {
      throw new InvalidInputError(
        'The amended ruleset would not be valid; nothing was saved.',
        documentProblems(checked.problems, edit.content),
      );
    }
    const { version: document, contentSha256 } = checked.ruleset;
    if (contentSha256 === draft.contentSha256) return;
    await trx('ruleset_versions')
      .where({ id: draft.stored.id })
      .update({ content: JSON.stringify(document), content_sha256: contentSha256 });
    await recordAudit(trx, {
      organisationId: organisation.id,
      actorUserId: user.id,
      actorLabel: user.email,
      action: 'ruleset.amendment.edited',
      entityType: 'ruleset_version',
      entityId: draft.stored.id,
      ip: request.ip,
      detail: {
        family,
        version,
        contentSha256,
        changedRules: Object.keys(patch.rules ?? {}),
        addedRules: document.rules
          .filter((r) => r.local && !draft.content.rules.some((old) => old.id === r.id))
          .map((r) => r.id),
        removedRules: patch.removeRules ?? [],
      },
    });
    void loadedRuleset(contentSha256, async () => document);
  });
  return detailAfterCommit(user, family, version);
}

/** Publishes a draft: from now on its content never changes (the trigger holds it too). */
export async function publishDraft(
  { user, organisation }: AmendmentSession,
  family: string,
  version: string,
  request: RequestFacts,
): Promise<RulesetVersionDetail> {
  const publishedId = await db().transaction(async (trx) => {
    const draft = await lockOwnVersion(trx, user, family, version, 'published from here');
    const checked = validateRuleset(draft.content);
    if (!checked.ok)
      throw new InvalidInputError(
        'This draft is not a valid ruleset; fix it before publishing.',
        documentProblems(checked.problems, draft.content),
      );
    await trx('ruleset_versions')
      .where({ id: draft.stored.id })
      .update({ status: 'published', published_at: trx.fn.now() });
    await recordAudit(trx, {
      organisationId: organisation.id,
      actorUserId: user.id,
      actorLabel: user.email,
      action: 'ruleset.amendment.published',
      entityType: 'ruleset_version',
      entityId: draft.stored.id,
      ip: request.ip,
      detail: {
        family,
        version,
        contentSha256: draft.contentSha256,
        derivedFrom: draft.content.derivedFrom ?? null,
      },
    });
    return draft.stored.id as string;
  });
  // The impact of the new version on the archive, on the job queue (src/lib/server/impact-runs.ts).
  await queueImpactAfterPublish(publishedId).catch((error) =>
    console.warn('[impact] could not queue the run:', error instanceof Error ? error.message : error),
  );
  return detailAfterCommit(user, family, version);
}

/** Deletes a draft (and its family, when that was its only version). Published versions stay for the record. */
export async function deleteDraft(
  { user, organisation }: AmendmentSession,
  family: string,
  version: string,
  request: RequestFacts,
): Promise<void> {
  await db().transaction(async (trx) => {
    const draft = await lockOwnVersion(trx, user, family, version, 'deleted');
    try {
      await trx('ruleset_versions').where({ id: draft.stored.id }).delete();
    } catch (error) {
      if (pgErrorCode(error) === FOREIGN_KEY_VIOLATION)
        throw new ConflictError('Something on record refers to this draft, so it is kept.');
      throw error;
    }
    const left = await trx('ruleset_versions').where({ ruleset_id: draft.stored.family.id }).first('id');
    if (!left) await trx('rulesets').where({ id: draft.stored.family.id }).delete();
    await recordAudit(trx, {
      organisationId: organisation.id,
      actorUserId: user.id,
      actorLabel: user.email,
      action: 'ruleset.amendment.deleted',
      entityType: 'ruleset_version',
      entityId: draft.stored.id,
      ip: request.ip,
      detail: { family, version, contentSha256: draft.contentSha256 },
    });
  });
}
