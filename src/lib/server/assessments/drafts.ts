/**
 * Assessments: drafts pinned to a published ruleset version, saved with a row version, and
 * submitted for scoring. The one module holding their SQL. Staff see the organisation's
 * assessments; a homeowner sees only those of their own client that were sent for signature.
 */
import { carryForwardIntoDraft, pendingAfterPatch, type CarriedForward } from './carry-forward';
import type { Knex } from 'knex';
import { LRUCache } from 'lru-cache';
import type {
  Assessment,
  AssessmentCreate,
  AssessmentListQuery,
  AssessmentPatch,
  AssessmentSummary,
  SavedDraft,
} from '@/lib/api/assessments';
import type { Page } from '@/lib/api/common';
import type { RulesetQuestion } from '@/lib/rules/ruleset-schema';
import { mergeDocuments, type AssessmentDocuments } from '../assessment-input';
import { recordAudit } from '../audit';
import { db } from '../db';
import { ConflictError, ForbiddenError, InvalidInputError } from '../errors';
import {
  fetchPageCounted,
  fetchPageJson,
  FOREIGN_KEY_VIOLATION,
  iso,
  isoTextSql,
  pgErrorCode,
} from '../listing';
import type { SessionUser } from '../session-user';
import { loadedRuleset } from '../ruleset-cache';
import { parseScoredRecord, type ScoredRecord } from './scored-record';

/** Statuses a homeowner may see: the report has been sent to them. */
const HOMEOWNER_VISIBLE = ['awaiting_signature', 'signed', 'superseded'] as const;

export interface SummaryRow {
  id: string;
  status: Assessment['status'];
  purpose: Assessment['purpose'];
  verdict: Assessment['verdict'];
  row_version: number;
  gate_id: string;
  gate_label: string;
  gate_kind: string;
  site_id: string;
  site_name: string | null;
  site_address_line1: string;
  site_city: string;
  site_usage_class: number;
  client_id: string;
  client_name: string;
  auditor_id: string;
  auditor_name: string;
  ruleset_version_id: string;
  ruleset_family: string;
  ruleset_version: string;
  ruleset_title: string;
  visited_on: Date | null;
  submitted_at: Date | null;
  signed_at: Date | null;
  created_at: Date;
  updated_at: Date;
}

interface FullRow extends SummaryRow {
  answers: Assessment['answers'];
  measurements: Assessment['measurements'];
  observations: Assessment['observations'];
  scored_record: unknown;
  result_sha256: string | null;
}

/**
 * Once submitted, what the assessment shows of its gate, site, client and ruleset is the frozen
 * record's (scored-record.ts); a draft shows the live rows it will be scored against. The frozen
 * values come from the small `scored_summary` the database derives from each record (migration
 * 20261204181800_assessment_scored_summary): `#>>` on the record itself would decompress the
 * whole record once per value.
 */
const frozenListed = (key: string, live: string, alias: string, cast = '') =>
  db().raw(`coalesce((a.scored_summary ->> '${key}')${cast}, ${live}) as ${alias}`);

export const summaryColumns = () => [
  'a.id',
  'a.status',
  'a.purpose',
  'a.verdict',
  'a.row_version',
  'a.gate_id',
  frozenListed('gateLabel', 'g.label', 'gate_label'),
  frozenListed('gateKind', 'g.kind', 'gate_kind'),
  frozenListed('siteId', 's.id::text', 'site_id'),
  frozenListed('siteName', 's.name', 'site_name'),
  frozenListed('siteAddressLine1', 's.address_line1', 'site_address_line1'),
  frozenListed('siteCity', 's.city', 'site_city'),
  frozenListed('siteUsageClass', 's.usage_class', 'site_usage_class', '::int'),
  frozenListed('clientId', 'c.id::text', 'client_id'),
  frozenListed('clientName', 'c.name', 'client_name'),
  'a.auditor_id',
  'u.name as auditor_name',
  'a.ruleset_version_id',
  'r.family as ruleset_family',
  'rv.version as ruleset_version',
  frozenListed('rulesetTitle', 'r.title', 'ruleset_title'),
  'a.visited_on',
  'a.submitted_at',
  'a.signed_at',
  'a.created_at',
  'a.updated_at',
];

const fullColumns = () => [
  ...summaryColumns(),
  'a.answers',
  'a.measurements',
  'a.observations',
  // Not a.result or a.gate_snapshot: what is shown of them comes from the record.
  'a.scored_record',
  'a.result_sha256',
];

const sortColumns: Record<AssessmentListQuery['sort']['field'], string> = {
  visitedOn: 'a.visited_on',
  createdAt: 'a.created_at',
  updatedAt: 'a.updated_at',
  submittedAt: 'a.submitted_at',
};

const isoOrNull = (value: Date | null) => (value ? iso(value) : null);

export function toSummary(row: SummaryRow): AssessmentSummary {
  return {
    id: row.id,
    status: row.status,
    purpose: row.purpose,
    verdict: row.verdict,
    rowVersion: row.row_version,
    gate: { id: row.gate_id, label: row.gate_label, kind: row.gate_kind },
    site: {
      id: row.site_id,
      name: row.site_name,
      addressLine1: row.site_address_line1,
      city: row.site_city,
      usageClass: row.site_usage_class,
    },
    client: { id: row.client_id, name: row.client_name },
    auditor: { id: row.auditor_id, name: row.auditor_name },
    ruleset: {
      versionId: row.ruleset_version_id,
      family: row.ruleset_family,
      version: row.ruleset_version,
      title: row.ruleset_title,
    },
    visitedOn: isoOrNull(row.visited_on),
    submittedAt: isoOrNull(row.submitted_at),
    signedAt: isoOrNull(row.signed_at),
    createdAt: iso(row.created_at),
    updatedAt: iso(row.updated_at),
  };
}

/** A submitted assessment's documents and result come from its frozen record, parsed strictly. */
function toAssessment(row: FullRow): Assessment {
  const summary = toSummary(row);
  if (row.status === 'draft') {
    return {
      ...summary,
      answers: row.answers ?? {},
      measurements: row.measurements ?? {},
      observations: row.observations ?? {},
      gateSnapshot: null,
      result: null,
      resultSha256: null,
    };
  }
  return { ...summary, ...frozenDocuments(parseScoredRecord(row.id, row.scored_record), row.scored_record) };
}

/** What a submitted assessment shows of its frozen record beside the summary. */
export function frozenDocuments(record: ScoredRecord, raw: unknown) {
  return {
    answers: record.answers as Assessment['answers'],
    measurements: record.measurements as Assessment['measurements'],
    observations: record.observations as Assessment['observations'],
    gateSnapshot: { ...record.gate, site: record.site, client: record.client },
    // As stored (parsed only to prove it sound): the engine's fields the schema does not name stay.
    result: (raw as { result: unknown }).result,
    resultSha256: record.resultSha256,
  };
}

/**
 * The assessments a viewer may see, joined to what the list shows about each; `from` names
 * another source of assessment rows as `a` (a save's updated row).
 */
export function visibleAssessments(
  knex: Knex,
  viewer: SessionUser,
  from = 'assessments as a',
): Knex.QueryBuilder {
  const query = knex(from)
    .join('gates as g', 'g.id', 'a.gate_id')
    .join('sites as s', 's.id', 'g.site_id')
    .join('clients as c', 'c.id', 's.client_id')
    .join('users as u', 'u.id', 'a.auditor_id')
    .join('ruleset_versions as rv', 'rv.id', 'a.ruleset_version_id')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .where('a.organisation_id', viewer.organisationId);
  if (viewer.role === 'homeowner')
    query.andWhere('s.client_id', viewer.clientId).whereIn('a.status', HOMEOWNER_VISIBLE);
  return query;
}

/** The assessments the viewer may see that match the list's filters, as the list's base query. */
function filteredAssessments(viewer: SessionUser, timeZone: string, query: AssessmentListQuery) {
  const base = visibleAssessments(db(), viewer);
  if (query.status) base.andWhere('a.status', query.status);
  if (query.verdict) base.andWhere('a.verdict', query.verdict);
  if (query.purpose) base.andWhere('a.purpose', query.purpose);
  if (query.gateKind) base.andWhere('g.kind', query.gateKind);
  if (query.auditorId) base.andWhere('a.auditor_id', query.auditorId);
  if (query.gateId) base.andWhere('a.gate_id', query.gateId);
  if (query.siteId) base.andWhere('g.site_id', query.siteId);
  if (query.clientId) base.andWhere('s.client_id', query.clientId);
  // Dates are days in the organisation's time zone: from its midnight to the next one after `to`.
  if (query.from)
    base.andWhereRaw('a.visited_on >= (?::date)::timestamp at time zone ?', [query.from, timeZone]);
  if (query.to)
    base.andWhereRaw('a.visited_on < (?::date + 1)::timestamp at time zone ?', [query.to, timeZone]);
  return base;
}

export async function listAssessments(
  viewer: SessionUser,
  timeZone: string,
  query: AssessmentListQuery,
): Promise<Page<AssessmentSummary>> {
  return fetchPageCounted<SummaryRow, AssessmentSummary>(
    {
      base: filteredAssessments(viewer, timeZone, query),
      columns: summaryColumns(),
      order: { column: sortColumns[query.sort.field], direction: query.sort.direction },
      idColumn: 'a.id',
      map: toSummary,
    },
    query,
  );
}

/**
 * SQL giving the summary of the row `p` (with summaryColumns' names) as JSON text, byte for
 * byte `JSON.stringify(toSummary(row))`: the same keys in the same order, `row_to_json` writing
 * them without spaces and escaping strings as JSON.stringify does, timestamps as toISOString
 * writes them (`isoTextSql`). Keep it in step with toSummary; the list test compares the two.
 */
export function summaryJsonSql(p: string): string {
  const object = (fields: string) => `(select row_to_json(o) from (select ${fields}) o)`;
  return `(select row_to_json(j) from (select ${p}.id, ${p}.status, ${p}.purpose, ${p}.verdict, ${p}.row_version as "rowVersion", ${object(
    `${p}.gate_id as id, ${p}.gate_label as label, ${p}.gate_kind as kind`,
  )} as gate, ${object(
    `${p}.site_id as id, ${p}.site_name as name, ${p}.site_address_line1 as "addressLine1", ${p}.site_city as city, ${p}.site_usage_class as "usageClass"`,
  )} as site, ${object(`${p}.client_id as id, ${p}.client_name as name`)} as client, ${object(
    `${p}.auditor_id as id, ${p}.auditor_name as name`,
  )} as auditor, ${object(
    `${p}.ruleset_version_id as "versionId", ${p}.ruleset_family as family, ${p}.ruleset_version as version, ${p}.ruleset_title as title`,
  )} as ruleset, ${isoTextSql(`${p}.visited_on`)} as "visitedOn", ${isoTextSql(`${p}.submitted_at`)} as "submittedAt", ${isoTextSql(
    `${p}.signed_at`,
  )} as "signedAt", ${isoTextSql(`${p}.created_at`)} as "createdAt", ${isoTextSql(`${p}.updated_at`)} as "updatedAt") j)`;
}

/**
 * What a summary is made of, over visibleAssessments' tables: the assessment's id and the `xmin`
 * (the version) of the assessment, gate, site, client, auditor, ruleset version and ruleset rows.
 */
const summaryKeySql = `concat_ws(' ', a.id, a.xmin, g.xmin, s.xmin, c.xmin, u.xmin, rv.xmin, r.xmin)`;

/**
 * `listAssessments`' page as the JSON text `JSON.stringify` gives of it, built by the database
 * (`GET /api/assessments`): no row is parsed, mapped and stringified again here.
 */
export async function listAssessmentsJson(
  viewer: SessionUser,
  timeZone: string,
  query: AssessmentListQuery,
): Promise<string> {
  return fetchPageJson(
    {
      base: filteredAssessments(viewer, timeZone, query),
      columns: summaryColumns(),
      order: { column: sortColumns[query.sort.field], direction: query.sort.direction },
      idColumn: 'a.id',
      rowKeySql: summaryKeySql,
      itemJsonSql: summaryJsonSql,
      listKey: JSON.stringify([viewer.organisationId, viewer.role, viewer.clientId, timeZone, query]),
    },
    query,
  );
}

export async function getAssessment(
  viewer: SessionUser,
  id: string,
  knex: Knex = db(),
): Promise<Assessment | null> {
  const row = await visibleAssessments(knex, viewer)
    .andWhere('a.id', id)
    .first<FullRow | undefined>(fullColumns());
  return row ? toAssessment(row) : null;
}

function invalid(field: string, message: string): InvalidInputError {
  return InvalidInputError.field(field, message);
}

/** The family's current version for this organisation: its own family of that name first, else the shipped one; the latest published. */
async function currentPublishedVersion(
  knex: Knex,
  organisationId: string,
  family: string,
): Promise<{ id: string; version: string } | undefined> {
  return knex('ruleset_versions as rv')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .where('r.family', family)
    .andWhere((w) => w.where('r.organisation_id', organisationId).orWhereNull('r.organisation_id'))
    .andWhere('rv.status', 'published')
    .orderByRaw('r.organisation_id is null, rv.published_at desc, rv.created_at desc')
    .first('rv.id', 'rv.version');
}

/** Whose draft it is: an auditor starts their own; owner / office may name a member of staff. */
async function resolveAuditor(
  knex: Knex,
  viewer: SessionUser,
  auditorId: string | undefined,
): Promise<string> {
  if (auditorId === undefined || auditorId === viewer.id) return viewer.id;
  if (viewer.role === 'auditor') throw new ForbiddenError('An auditor starts assessments for themself only.');
  const person = await knex('users')
    .where({ id: auditorId, organisation_id: viewer.organisationId, active: true })
    .whereIn('role', ['owner', 'office', 'auditor'])
    .first('id');
  if (!person) throw invalid('auditorId', 'no active member of staff with this id in the organisation');
  return auditorId;
}

export interface RequestFacts {
  ip: string | null;
}

/** Starts a draft pinned to the family's current published version; audited. */
export async function createAssessment(
  viewer: SessionUser,
  input: AssessmentCreate,
  request: RequestFacts,
  knex: Knex = db(),
): Promise<Assessment> {
  return knex.transaction(async (trx) => {
    const gate = await trx('gates')
      .where({ id: input.gateId, organisation_id: viewer.organisationId })
      .forShare()
      .first('id');
    if (!gate) throw invalid('gateId', 'no such gate in this organisation');
    const auditorId = await resolveAuditor(trx, viewer, input.auditorId);
    const version = await currentPublishedVersion(trx, viewer.organisationId, input.family);
    if (!version) throw invalid('family', `no published version of the ruleset family "${input.family}"`);
    const [{ id }] = await trx('assessments')
      .insert({
        organisation_id: viewer.organisationId,
        gate_id: input.gateId,
        ruleset_version_id: version.id,
        auditor_id: auditorId,
        purpose: input.purpose,
        visited_on: input.visitedOn ?? trx.fn.now(),
      })
      .returning<{ id: string }[]>('id');
    const carried = input.carryForward
      ? await carryForwardIntoDraft(trx, viewer.organisationId, input.gateId, id, version.id)
      : null;
    await recordAudit(trx, {
      organisationId: viewer.organisationId,
      actorUserId: viewer.id,
      actorLabel: viewer.email,
      action: 'assessment.created',
      entityType: 'assessment',
      entityId: id,
      ip: request.ip,
      detail: {
        gateId: input.gateId,
        family: input.family,
        version: version.version,
        rulesetVersionId: version.id,
        purpose: input.purpose,
        auditorId,
        ...(carried ? { carriedForwardFrom: carried.fromAssessmentId, carried: carried.pending.length } : {}),
      },
    });
    return (await getAssessment(viewer, id as string, trx)) as Assessment;
  });
}

/** The checks every change to a draft makes, in the order a person would want to hear them. */
export function assertEditable(
  viewer: SessionUser,
  current: Assessment,
  expectedVersion: number | undefined,
): void {
  if (viewer.role === 'auditor' && current.auditor.id !== viewer.id) {
    throw new ForbiddenError("This is another auditor's assessment; only they or the office may change it.");
  }
  if (current.status !== 'draft') {
    throw new ConflictError(
      `This assessment is ${current.status.replace('_', ' ')} and can no longer be changed.`,
      { current },
    );
  }
  if (expectedVersion !== undefined && current.rowVersion !== expectedVersion)
    throw staleProblem(current, expectedVersion);
}

/** 409 for a change made against an older row version; carries the current state to merge with. */
function staleProblem(current: Assessment, expectedVersion: number): ConflictError {
  return new ConflictError(
    `Someone saved this assessment after you read it (you sent version ${expectedVersion}; it is now at ${current.rowVersion}). Apply your change to the current state and send it again.`,
    { current },
  );
}

/** The columns of a draft a save reads: the checks, the documents to merge into, the pinned content's hash. */
interface DraftForSave {
  status: Assessment['status'];
  auditor_id: string;
  row_version: number;
  ruleset_version_id: string;
  content_sha256: string;
  answers: Assessment['answers'] | null;
  measurements: Assessment['measurements'] | null;
  observations: Assessment['observations'] | null;
  carried_forward: CarriedForward | null;
}

/**
 * The pinned version's questions from the process's ruleset cache (content-addressed by the
 * version's SHA-256, so never stale): a save no longer reads and parses the version's content.
 */
async function pinnedQuestions(
  knex: Knex,
  draft: Pick<DraftForSave, 'ruleset_version_id' | 'content_sha256'>,
): Promise<readonly RulesetQuestion[]> {
  const loaded = await loadedRuleset(draft.content_sha256, async () => {
    const row = await knex('ruleset_versions')
      .where({ id: draft.ruleset_version_id })
      .first<{ content: unknown } | undefined>('content');
    if (!row) throw new Error(`ruleset version ${draft.ruleset_version_id} disappeared while loading`);
    return row.content;
  });
  return loaded.version.questions;
}

/** What a save answers: the assessment as GET shows it, or (`Prefer: return=minimal`) `SavedDraft`. */
export type SaveAnswer = 'full' | 'minimal';

/** A draft this process saved, as its row now stands (`xmin`): what the next save over it needs. */
interface KnownDraft {
  organisationId: string;
  auditorId: string;
  xmin: string;
  rowVersion: number;
  rulesetVersionId: string;
  contentSha256: string;
  documents: AssessmentDocuments;
  carried: CarriedForward | null;
}

/**
 * The drafts this process saved last, by organisation and id (about 16 MB at most; a draft's
 * documents are a few KB). An entry is only a guess at the row: a save that uses it sends its
 * `xmin` along, and the database refuses the update when the row was written since by anyone
 * (another instance, a confirmation that leaves the row version alone, SQL by hand), since any
 * UPDATE gives the row a new `xmin`.
 */
const knownDrafts = new LRUCache<string, KnownDraft>({ maxSize: 16 * 1024 * 1024 });
const knownKey = (organisationId: string, id: string) => `${organisationId}/${id}`;

/** Forgets every known draft (tests). */
export function forgetKnownDrafts(): void {
  knownDrafts.clear();
}

/** The row a save wrote: the summary as GET shows it (full answer) or its new version (minimal). */
interface SavedRow extends Partial<SummaryRow> {
  row_version: number;
  status: Assessment['status'];
  updated_at: Date;
  row_xmin: string;
}

/**
 * One conditional UPDATE of the draft from `base` (its documents as of `expectedVersion`) and the
 * patch. `unmatched` when the row did not match (someone wrote it since, it left draft, it is
 * not this viewer's); with an `xmin`, `invalid` instead of the 422 (the caller then reads the row
 * and answers in the usual order: 403, 409, then 422).
 */
async function saveOver(
  knex: Knex,
  viewer: SessionUser,
  id: string,
  expectedVersion: number,
  patch: AssessmentPatch,
  base: Omit<KnownDraft, 'xmin' | 'rowVersion' | 'organisationId'>,
  xmin: string | null,
  answer: SaveAnswer,
): Promise<Assessment | SavedDraft | 'unmatched' | 'invalid'> {
  const merged = mergeDocuments(
    base.documents,
    patch,
    await pinnedQuestions(knex, {
      ruleset_version_id: base.rulesetVersionId,
      content_sha256: base.contentSha256,
    }),
  );
  if (!merged.ok) {
    if (xmin !== null) return 'invalid';
    throw new InvalidInputError('Some fields are missing or invalid.', merged.errors);
  }
  const documents = merged.value;
  const text = {
    answers: JSON.stringify(documents.answers),
    measurements: JSON.stringify(documents.measurements),
    observations: JSON.stringify(documents.observations),
  };
  const changes: Record<string, unknown> = {
    ...text,
    row_version: knex.raw('row_version + 1'),
    updated_at: knex.fn.now(),
  };
  if (patch.purpose !== undefined) changes.purpose = patch.purpose;
  // Saving a carried-forward answer (changed or not) confirms it.
  let carried = base.carried;
  if (carried?.pending.length) {
    carried = { ...carried, pending: pendingAfterPatch(carried, patch) };
    changes.carried_forward = JSON.stringify(carried);
  }
  if (patch.visitedOn !== undefined) changes.visited_on = patch.visitedOn;
  const update = (query: Knex.QueryBuilder) => {
    query
      .from('assessments')
      .where({ id, organisation_id: viewer.organisationId, row_version: expectedVersion, status: 'draft' });
    if (viewer.role === 'auditor') query.andWhere('auditor_id', viewer.id);
    if (xmin !== null) query.andWhereRaw('xmin = ?::xid', [xmin]);
    return query.update(changes);
  };
  const saved =
    answer === 'minimal'
      ? (
          (await update(knex.queryBuilder()).returning([
            'row_version',
            'status',
            'updated_at',
            knex.raw('xmin::text as row_xmin'),
          ])) as SavedRow[]
        )[0]
      : await visibleAssessments(knex, viewer, 'saved as a')
          .with('saved', (query) => update(query).returning(['*', knex.raw('xmin::text as row_xmin')]))
          .first<SavedRow | undefined>([...fullColumns(), 'a.row_xmin']);
  if (!saved) return 'unmatched';
  const key = knownKey(viewer.organisationId, id);
  const held = knownDrafts.get(key);
  if (!held || held.rowVersion < saved.row_version)
    knownDrafts.set(
      key,
      {
        ...base,
        organisationId: viewer.organisationId,
        xmin: saved.row_xmin,
        rowVersion: saved.row_version,
        documents,
        carried,
      },
      { size: 2 * (text.answers.length + text.measurements.length + text.observations.length) + 1024 },
    );
  if (answer === 'minimal')
    return {
      id,
      status: saved.status,
      rowVersion: saved.row_version,
      updatedAt: iso(saved.updated_at),
      ...documents,
    };
  // The full answer is GET's, byte for byte: the documents as PostgreSQL stores them (jsonb
  // orders an object's keys its own way), not as merged here.
  return toAssessment(saved as unknown as FullRow);
}

/**
 * Saves a merge patch to a draft, but only over the row version the client read: the update
 * is one `UPDATE … WHERE id = ? AND row_version = ?`, so of two saves made from the same
 * version exactly one wins and the other gets 409 with the current state.
 *
 * One statement when this process saved the draft last and nobody wrote the row since: the
 * documents it wrote are merged with the patch here and the update names the row's `xmin`
 * (see `knownDrafts`), and for the full answer joins what GET shows in the same statement
 * (`WITH saved AS (UPDATE … RETURNING *) SELECT …`). Otherwise, or when that update matches
 * nothing, two: the draft's own row (no joins but its version's hash), then the update. Only a
 * refusal reads the full assessment, for the problem's `current`.
 */
export async function patchAssessment(
  viewer: SessionUser,
  id: string,
  expectedVersion: number,
  patch: AssessmentPatch,
  answer: SaveAnswer = 'full',
): Promise<Assessment | SavedDraft | null> {
  const knex = db();
  const key = knownKey(viewer.organisationId, id);
  const known = knownDrafts.get(key);
  if (
    known &&
    known.organisationId === viewer.organisationId &&
    known.rowVersion === expectedVersion &&
    viewer.role !== 'homeowner' &&
    (viewer.role !== 'auditor' || known.auditorId === viewer.id)
  ) {
    const saved = await saveOver(knex, viewer, id, expectedVersion, patch, known, known.xmin, answer);
    if (saved === 'unmatched') {
      if (knownDrafts.get(key) === known) knownDrafts.delete(key);
    } else if (saved !== 'invalid') return saved;
  }
  /** The refusal, with the assessment as it is now; null when the viewer cannot see it. */
  const refuse = async (): Promise<null> => {
    const now = await getAssessment(viewer, id, knex);
    if (!now) return null;
    assertEditable(viewer, now, expectedVersion);
    throw staleProblem(now, expectedVersion);
  };
  const draft = await knex('assessments as a')
    .join('ruleset_versions as rv', 'rv.id', 'a.ruleset_version_id')
    .where({ 'a.id': id, 'a.organisation_id': viewer.organisationId })
    .first<DraftForSave | undefined>(
      'a.status',
      'a.auditor_id',
      'a.row_version',
      'a.ruleset_version_id',
      'rv.content_sha256',
      'a.answers',
      'a.measurements',
      'a.observations',
      'a.carried_forward',
    );
  if (!draft) return null;
  // The same checks as assertEditable, on the row alone; any that fails is answered from the full read.
  if (
    viewer.role === 'homeowner' ||
    (viewer.role === 'auditor' && draft.auditor_id !== viewer.id) ||
    draft.status !== 'draft' ||
    draft.row_version !== expectedVersion
  )
    return refuse();
  const base = {
    auditorId: draft.auditor_id,
    rulesetVersionId: draft.ruleset_version_id,
    contentSha256: draft.content_sha256,
    documents: {
      answers: draft.answers ?? {},
      measurements: draft.measurements ?? {},
      observations: draft.observations ?? {},
    } satisfies AssessmentDocuments,
    carried: draft.carried_forward,
  };
  const saved = await saveOver(knex, viewer, id, expectedVersion, patch, base, null, answer);
  return typeof saved === 'string' ? refuse() : saved;
}

/**
 * Discards a draft (and only a draft); audited. A discarded revision puts the report it was
 * to replace back to signed (the database allows superseded -> signed only once no revision
 * names it), so a report is never left superseded with nothing in its place.
 */
export async function discardAssessment(
  viewer: SessionUser,
  id: string,
  request: RequestFacts,
): Promise<boolean> {
  return db().transaction(async (trx) => {
    // Locked first, so the status checked below is the one the delete sees.
    const draft = await trx('assessments')
      .where({ id, organisation_id: viewer.organisationId })
      .forUpdate()
      .first('supersedes_id');
    if (!draft) return false;
    const current = await getAssessment(viewer, id, trx);
    if (!current) return false;
    assertEditable(viewer, current, undefined);
    try {
      await trx('assessments')
        .where({ id, organisation_id: viewer.organisationId, status: 'draft' })
        .delete();
    } catch (error) {
      if (pgErrorCode(error) === FOREIGN_KEY_VIOLATION)
        throw new ConflictError('This draft has photos or force traces attached; remove them first.');
      throw error;
    }
    const actor = {
      organisationId: viewer.organisationId,
      actorUserId: viewer.id,
      actorLabel: viewer.email,
      ip: request.ip,
    };
    await recordAudit(trx, {
      ...actor,
      action: 'assessment.discarded',
      entityType: 'assessment',
      entityId: id,
      detail: {
        gateId: current.gate.id,
        rowVersion: current.rowVersion,
        ...(draft.supersedes_id ? { supersedesId: draft.supersedes_id } : {}),
      },
    });
    if (draft.supersedes_id) {
      const restored = await trx('assessments')
        .where({ id: draft.supersedes_id, organisation_id: viewer.organisationId, status: 'superseded' })
        .update({ status: 'signed', updated_at: trx.fn.now() });
      if (restored > 0) {
        await recordAudit(trx, {
          ...actor,
          action: 'assessment.revision_discarded',
          entityType: 'assessment',
          entityId: draft.supersedes_id,
          detail: { discardedRevisionId: id, restoredStatus: 'signed' },
        });
      }
    }
    return true;
  });
}

/** The assessment this one revises and the one that replaced it, each only when the viewer may see it. */
export async function revisionLinks(
  viewer: SessionUser,
  id: string,
  knex: Knex = db(),
): Promise<{ revises: string | null; replacedBy: string | null }> {
  const own = await visibleAssessments(knex, viewer)
    .andWhere('a.id', id)
    .first<{ supersedes_id: string | null } | undefined>('a.supersedes_id');
  if (!own) return { revises: null, replacedBy: null };
  const [revises, replacedBy] = await Promise.all([
    own.supersedes_id
      ? visibleAssessments(knex, viewer)
          .andWhere('a.id', own.supersedes_id)
          .first<{ id: string } | undefined>('a.id')
      : undefined,
    visibleAssessments(knex, viewer)
      .andWhere('a.supersedes_id', id)
      .orderBy('a.created_at', 'desc')
      .first<{ id: string } | undefined>('a.id'),
  ]);
  return { revises: revises?.id ?? null, replacedBy: replacedBy?.id ?? null };
}
