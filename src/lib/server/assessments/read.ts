/**
 * `GET /api/assessments/:id` as JSON text, the same document `getAssessment` gives, made cheaply.
 *
 * The summary columns of a submitted assessment come from its frozen record; read through
 * `#>>` once per column, PostgreSQL decompressed the whole record (tens of KB) for each, and the
 * record was then sent, parsed, checked with zod and stringified again on every read. Here:
 *
 * - The row is read with its live columns and its `xmin` (the transaction that wrote this version
 *   of the row; any UPDATE, even one that disables a trigger, gives a new one). The record is
 *   sent only when this process holds nothing for that `xmin`.
 * - A record that came back is parsed strictly (`parseScoredRecord`: a damaged record is a 500,
 *   never a default), and what the answer shows of it is kept as JSON text by assessment id and
 *   `xmin`, in a bounded LRU. Another instance or a change by hand cannot make it stale: a row
 *   whose `xmin` moved on is read again.
 * - Who may see the row is decided by the query every time; the cache holds only what the
 *   record says, which is the same for every viewer allowed to see it.
 */
import { LRUCache } from 'lru-cache';
import type { Assessment } from '@/lib/api/assessments';
import { compiledQuery } from '../compiled-query';
import { db } from '../db';
import type { SessionUser } from '../session-user';
import { frozenDocuments, summaryColumns, toSummary, visibleAssessments, type SummaryRow } from './drafts';
import { parseScoredRecord } from './scored-record';

interface ReadRow extends SummaryRow {
  row_xmin: string;
  answers: Assessment['answers'] | null;
  measurements: Assessment['measurements'] | null;
  observations: Assessment['observations'] | null;
  /** Sent only when out of draft and not already held for this `xmin`. */
  scored_record: unknown;
}

/** What a frozen record adds to the summary, as JSON text, for one version (`xmin`) of the row. */
interface HeldRecord {
  xmin: string;
  /** `"answers":…,"measurements":…,"observations":…,"gateSnapshot":…,"result":…,"resultSha256":…` */
  tail: string;
}

/** About 32 MB of records at most (a full record's text is some 50 KB). */
const held = new LRUCache<string, HeldRecord>({
  maxSize: 32 * 1024 * 1024,
  sizeCalculation: (entry) => entry.tail.length * 2 + 512,
});

/** Forgets every held record (tests). */
export function forgetHeldRecords(): void {
  held.clear();
}

function hold(id: string, xmin: string, raw: unknown): HeldRecord {
  const record = parseScoredRecord(id, raw);
  const tail = JSON.stringify(frozenDocuments(record, raw)).slice(1, -1);
  const entry: HeldRecord = { xmin, tail };
  held.set(id, entry);
  return entry;
}

/**
 * The read's statement, compiled once per viewer role (compiled-query.ts): who may see the row is
 * visibleAssessments' to say, with the viewer's own values as parameters.
 */
const readQuery = compiledQuery(
  ['viewerId', 'organisationId', 'email', 'name', 'clientId', 'id', 'knownXmin'] as const,
  (knex, role, p) =>
    visibleAssessments(knex, {
      id: p.viewerId,
      organisationId: p.organisationId,
      email: p.email,
      name: p.name,
      role: role as SessionUser['role'],
      clientId: p.clientId,
    })
      .andWhere('a.id', p.id)
      .first([
        ...summaryColumns(),
        knex.raw('a.xmin::text as row_xmin'),
        knex.raw(`case when a.status = 'draft' then a.answers end as answers`),
        knex.raw(`case when a.status = 'draft' then a.measurements end as measurements`),
        knex.raw(`case when a.status = 'draft' then a.observations end as observations`),
        knex.raw(
          `case when a.status <> 'draft' and a.xmin::text is distinct from ? then a.scored_record end as scored_record`,
          [p.knownXmin],
        ),
      ]),
);

/** The assessment as the JSON text of `getAssessment`'s answer, or null when this viewer cannot see it. */
export async function readAssessmentJson(
  viewer: SessionUser,
  id: string,
): Promise<{ body: string; rowVersion: number } | null> {
  const known = held.get(id);
  const row = (
    await readQuery.raw(db(), viewer.role, {
      viewerId: viewer.id,
      organisationId: viewer.organisationId,
      email: viewer.email,
      name: viewer.name,
      clientId: viewer.clientId,
      id,
      knownXmin: known?.xmin ?? null,
    })
  ).rows[0] as ReadRow | undefined;
  if (!row) return null;
  if (row.status === 'draft') {
    const draft: Assessment = {
      ...toSummary(row),
      answers: row.answers ?? {},
      measurements: row.measurements ?? {},
      observations: row.observations ?? {},
      gateSnapshot: null,
      result: null,
      resultSha256: null,
    };
    return { body: JSON.stringify(draft), rowVersion: row.row_version };
  }
  const record = known && known.xmin === row.row_xmin ? known : hold(row.id, row.row_xmin, row.scored_record);
  // The summary's frozen values come from scored_summary, as the list's do.
  const summary = toSummary(row);
  return { body: `${JSON.stringify(summary).slice(0, -1)},${record.tail}}`, rowVersion: row.row_version };
}
