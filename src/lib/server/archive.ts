/**
 * The archive list: every assessment of the organisation, filtered (archive-filters.ts), sorted
 * and paged by keyset. A page is "the next `limit` rows after this (sort value, id)", so page
 * 400 costs what page 1 costs and rows filed meanwhile never shift a page. The total is a
 * separate call, so typing in the search box does not pay for counting.
 */
import type { Knex } from 'knex';
import { organisationAssessments } from './assessments';
import type {
  ArchiveFilter,
  ArchiveItem,
  ArchiveListQuery,
  ArchivePage,
  ArchiveSort,
} from '@/lib/api/archive';
import { applyArchiveFilter, archiveBase, archiveDateSql, archiveLookups } from './archive-filters';
import { db } from './db';
import { InvalidQueryError } from './errors';
import { iso } from './listing';

interface ArchiveRow {
  id: string;
  status: ArchiveItem['status'];
  verdict: ArchiveItem['verdict'];
  archive_date: Date;
  signed_at: Date | null;
  client_id: string;
  client_name: string;
  site_id: string;
  address_line1: string;
  city: string;
  postal_code: string | null;
  usage_class: number;
  gate_id: string;
  gate_label: string;
  gate_kind: string;
  auditor_id: string;
  auditor_name: string;
  family: string;
  version: string;
  signed_document_id: string | null;
  /** The sort value as PostgreSQL text, so a cursor keeps microseconds exactly. */
  sort_key: string;
  /** Parent sorts: the client or gate the row was reached through. */
  parent_id: string | null;
}

export const archiveColumns = (knex: Knex) => [
  'a.id',
  'a.status',
  'a.verdict',
  knex.raw(`${archiveDateSql} as archive_date`),
  'a.signed_at',
  'c.id as client_id',
  'c.name as client_name',
  's.id as site_id',
  's.address_line1',
  's.city',
  's.postal_code',
  's.usage_class',
  'g.id as gate_id',
  'g.label as gate_label',
  'g.kind as gate_kind',
  'a.auditor_id',
  ...archiveLookups(knex),
  knex.raw(
    `(select d.id from documents d where d.assessment_id = a.id and d.kind = 'signed_report') as signed_document_id`,
  ),
];

export function toArchiveItem(row: Omit<ArchiveRow, 'sort_key' | 'parent_id'>): ArchiveItem {
  return {
    id: row.id,
    status: row.status,
    verdict: row.verdict,
    date: iso(row.archive_date),
    signedAt: row.signed_at ? iso(row.signed_at) : null,
    client: { id: row.client_id, name: row.client_name },
    site: {
      id: row.site_id,
      addressLine1: row.address_line1,
      city: row.city,
      postalCode: row.postal_code,
      usageClass: row.usage_class,
    },
    gate: { id: row.gate_id, label: row.gate_label, kind: row.gate_kind },
    auditor: { id: row.auditor_id, name: row.auditor_name },
    ruleset: { family: row.family, version: row.version },
    signedDocumentId: row.signed_document_id,
  };
}

/**
 * How each sort is read. By date, the assessments' own (organisation, date, id) index gives the
 * order. By client or gate, the parent rows are walked in name order (their own index) and each
 * one's assessments joined in by id, so a page costs a few parents, not a sort of the archive.
 */
type SortPlan =
  | { kind: 'date'; direction: 'asc' | 'desc' }
  | {
      kind: 'parent';
      direction: 'asc' | 'desc';
      table: 'clients' | 'gates';
      key: 'name' | 'label';
      link: string;
    };

const sortPlans: Record<ArchiveSort, SortPlan> = {
  '-date': { kind: 'date', direction: 'desc' },
  date: { kind: 'date', direction: 'asc' },
  client: { kind: 'parent', direction: 'asc', table: 'clients', key: 'name', link: 's.client_id' },
  '-client': { kind: 'parent', direction: 'desc', table: 'clients', key: 'name', link: 's.client_id' },
  gate: { kind: 'parent', direction: 'asc', table: 'gates', key: 'label', link: 'a.gate_id' },
  '-gate': { kind: 'parent', direction: 'desc', table: 'gates', key: 'label', link: 'a.gate_id' },
};

/** Where a page starts: after (or before) this row in the sort. */
interface Cursor {
  sort: ArchiveSort;
  /** Date sorts: the date as PostgreSQL text (microseconds kept). Parent sorts: the parent's name. */
  value: string;
  /** Parent sorts: the client or gate id, tie-breaker between equal names. */
  parentId: string | null;
  id: string;
}

export function encodeCursor(cursor: Cursor): string {
  return Buffer.from(
    JSON.stringify([cursor.sort, cursor.value, cursor.parentId, cursor.id]),
    'utf8',
  ).toString('base64url');
}

/** timestamptz as PostgreSQL writes it: `2026-11-20 09:15:02.123456+00`. */
const timestampText = /^\d{4}-\d\d-\d\d \d\d:\d\d:\d\d(\.\d{1,6})?[+-]\d\d(:\d\d){0,2}$/;
const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** A cursor from a previous page of the same sort; 400 for anything else. */
export function decodeCursor(text: string, sort: ArchiveSort, field: 'after' | 'before'): Cursor {
  let parsed: unknown;
  try {
    parsed = JSON.parse(Buffer.from(text, 'base64url').toString('utf8'));
  } catch {
    parsed = null;
  }
  const bad = (message: string) =>
    new InvalidQueryError('Some query parameters are invalid.', [{ field, message }]);
  if (!Array.isArray(parsed) || parsed.length !== 4) throw bad('is not a cursor from this list');
  const [cursorSort, value, parentId, id] = parsed as unknown[];
  if (cursorSort !== sort) throw bad('belongs to another sort order; start again from the first page');
  const plan = sortPlans[sort];
  const valid =
    typeof value === 'string' &&
    value.length <= 300 &&
    typeof id === 'string' &&
    uuidPattern.test(id) &&
    (plan.kind === 'date'
      ? parentId === null && timestampText.test(value)
      : typeof parentId === 'string' && uuidPattern.test(parentId));
  if (!valid) throw bad('is not a cursor from this list');
  return { sort, value: value as string, parentId: parentId as string | null, id: id as string };
}

/** One page of the archive in the requested sort, before or after a cursor. */
export async function listArchive(
  organisationId: string,
  timeZone: string,
  query: ArchiveListQuery,
  knex: Knex = db(),
): Promise<ArchivePage> {
  const plan = sortPlans[query.sort];
  const backwards = Boolean(query.before);
  const cursor = query.after
    ? decodeCursor(query.after, query.sort, 'after')
    : query.before
      ? decodeCursor(query.before, query.sort, 'before')
      : null;
  // Reading backwards walks the opposite order from the cursor, then turns the page round.
  const direction = backwards ? (plan.direction === 'asc' ? 'desc' : 'asc') : plan.direction;
  const comparison = direction === 'asc' ? '>' : '<';
  const base = archiveBase(knex, organisationId);
  await applyArchiveFilter(base, knex, organisationId, query, timeZone);
  let rows: ArchiveRow[];
  if (plan.kind === 'date') {
    if (cursor)
      base.andWhereRaw(`(${archiveDateSql}, a.id) ${comparison} (?::timestamptz, ?::uuid)`, [
        cursor.value,
        cursor.id,
      ]);
    rows = (await base
      .select([
        ...archiveColumns(knex),
        knex.raw(`(${archiveDateSql})::text as sort_key`),
        knex.raw('null::uuid as parent_id'),
      ])
      .orderByRaw(`${archiveDateSql} ${direction}, a.id ${direction}`)
      .limit(query.limit + 1)) as ArchiveRow[];
  } else {
    const parents = knex(plan.table)
      .where('organisation_id', organisationId)
      .select('id', `${plan.key} as key`)
      .orderByRaw(`${plan.key} ${direction}, id ${direction}`);
    if (cursor) {
      parents.andWhereRaw(`(${plan.key}, id) ${comparison}= (?, ?::uuid)`, [cursor.value, cursor.parentId]);
      base.andWhereRaw(`((p.key, p.id) ${comparison} (?, ?::uuid) or a.id ${comparison} ?::uuid)`, [
        cursor.value,
        cursor.parentId,
        cursor.id,
      ]);
    }
    const perParent = base
      .andWhereRaw(`${plan.link} = p.id`)
      .select([...archiveColumns(knex), knex.raw('p.key as sort_key'), knex.raw('p.id as parent_id')])
      .orderBy('a.id', direction)
      .limit(query.limit + 1);
    // Parents come in name order from their index, so the sort below only orders rows within one parent.
    rows = (await knex
      .select('x.*')
      .from(parents.as('p'))
      .joinRaw('cross join lateral (?) x', [perParent as unknown as Knex.Value])
      .orderByRaw(`p.key ${direction}, p.id ${direction}, x.id ${direction}`)
      .limit(query.limit + 1)) as ArchiveRow[];
  }

  const more = rows.length > query.limit;
  const page = rows.slice(0, query.limit);
  if (backwards) page.reverse();
  const cursorOf = (row: ArchiveRow | undefined) =>
    row ? encodeCursor({ sort: query.sort, value: row.sort_key, parentId: row.parent_id, id: row.id }) : null;
  const hasNext = backwards ? true : more;
  const hasPrev = backwards ? more : Boolean(cursor);
  return {
    items: page.map(toArchiveItem),
    nextCursor: hasNext && page.length ? cursorOf(page[page.length - 1]) : null,
    prevCursor: hasPrev && page.length ? cursorOf(page[0]) : null,
  };
}

/** How many assessments the filter matches. */
export async function countArchive(
  organisationId: string,
  timeZone: string,
  filter: ArchiveFilter,
  knex: Knex = db(),
): Promise<number> {
  // Counting needs the joins only when a filter looks at the gate, site or client.
  const needsSite = Boolean(
    filter.q || filter.client || filter.address || filter.clientId || filter.usageClass,
  );
  const base = needsSite
    ? archiveBase(knex, organisationId)
    : filter.gateKind
      ? organisationAssessments(knex, organisationId).join('gates as g', 'g.id', 'a.gate_id')
      : organisationAssessments(knex, organisationId);
  await applyArchiveFilter(base, knex, organisationId, filter, timeZone);
  const [{ total }] = (await base.count({ total: '*' })) as { total: string | number }[];
  return Number(total);
}

/** What the archive's filter menus offer: the organisation's staff and the ruleset versions it has used or may use. */
export async function archiveFilterOptions(
  organisationId: string,
  knex: Knex = db(),
): Promise<{
  auditors: { id: string; name: string }[];
  rulesets: { family: string; title: string; versions: string[] }[];
}> {
  const [auditors, versions] = await Promise.all([
    knex('users')
      .where('organisation_id', organisationId)
      .whereIn('role', ['owner', 'office', 'auditor'])
      .orderBy('name')
      .select('id', 'name'),
    knex('ruleset_versions as rv')
      .join('rulesets as r', 'r.id', 'rv.ruleset_id')
      .where((w) => w.whereNull('r.organisation_id').orWhere('r.organisation_id', organisationId))
      .whereIn('rv.status', ['published', 'retired'])
      .orderBy([{ column: 'r.family' }, { column: 'rv.created_at', order: 'desc' }])
      .select('r.family', 'r.title', 'rv.version'),
  ]);
  const rulesets = new Map<string, { family: string; title: string; versions: string[] }>();
  for (const v of versions as { family: string; title: string; version: string }[]) {
    const entry = rulesets.get(v.family) ?? { family: v.family, title: v.title, versions: [] as string[] };
    entry.versions.push(v.version);
    rulesets.set(v.family, entry);
  }
  return { auditors, rulesets: [...rulesets.values()] };
}
