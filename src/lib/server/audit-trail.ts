/**
 * The owner's view of the audit trail: their organisation's events, newest first, and a
 * verification of the hash chain that points at the first broken link.
 *
 * The chain is one sequence for the whole database (audit.ts), so a link can only be checked
 * by walking all of it. The walk runs in one REPEATABLE READ snapshot, so events appended
 * while it runs are not half-seen. Each row is checked twice: its `prev_hash` must equal the
 * stored hash of the row before it (nothing removed or inserted), and its own hash must
 * match its fields (nothing edited). After a broken row the walk carries on from the row's
 * stored hash, so one edit is reported once instead of condemning everything after it.
 *
 * An owner is told where their own organisation's events break, and only how many breaks
 * there are elsewhere: other organisations' rows are none of their business.
 *
 * A chain cannot show its newest events removed. So the walk also checks the anchors
 * (audit-anchors.ts): the chain heads recorded by signed reports and exports, and any the
 * caller supplies from a file it holds. An anchored event past the trail's last one means the
 * trail was cut short; an anchored event with another hash means it was rewritten.
 */
import type { Knex } from 'knex';
import { auditHash, genesisHash } from './audit';
import { checkAnchors, TRUNCATED_MESSAGE, type AuditAnchor } from './audit-anchors';
import { gateAssessmentIdsAsText } from './assessments';
import { db } from './db';
import { iso } from './listing';

export interface AuditEventView {
  id: number;
  at: string;
  actorUserId: string | null;
  actorLabel: string | null;
  action: string;
  entityType: string | null;
  entityId: string | null;
  ip: string | null;
  detail: Record<string, unknown>;
  hash: string;
}

export interface AuditPage {
  items: AuditEventView[];
  /** Pass as `before` for older events; null when this page reaches the first event. */
  nextBefore: number | null;
}

export interface TrailVerification {
  /** True when every event of this organisation and every link into them are intact. */
  ok: boolean;
  /** Events of this organisation checked. */
  checked: number;
  /** Events checked across the whole chain. */
  chainLength: number;
  /** The organisation's first event whose hash or link does not match, when there is one. */
  firstBrokenId: number | null;
  /** `content`: the row's fields no longer give its hash; `link`: a row before it was removed, inserted or re-hashed. */
  brokenBy: 'content' | 'link' | null;
  /** Broken rows belonging to other organisations or to no organisation (counted, not shown). */
  brokenElsewhere: number;
  /** Anchors checked: the chain heads recorded by signed reports and exports, and those supplied. */
  anchorsChecked: number;
  /** Anchored events that are gone from the middle of the trail or carry another hash. */
  anchorsBroken: number;
  /** Set when the trail ends before an anchored event: its newest events were removed. */
  truncated: { anchoredEventId: number; lastEventId: number | null; message: string } | null;
  verifiedAt: string;
}

interface StoredRow {
  id: string | number;
  organisation_id: string | null;
  actor_user_id: string | null;
  actor_label: string | null;
  action: string;
  entity_type: string | null;
  entity_id: string | null;
  ip: string | null;
  detail: Record<string, unknown>;
  created_at: Date;
  prev_hash: string;
  hash: string;
}

const rowColumns = (knex: Knex) => [
  'id',
  'organisation_id',
  'actor_user_id',
  'actor_label',
  'action',
  'entity_type',
  'entity_id',
  knex.raw('host(ip) as ip'),
  'detail',
  'created_at',
  'prev_hash',
  'hash',
];

export interface AuditListOptions {
  before?: number;
  limit: number;
  action?: string;
  entityId?: string;
  /** Free text: found in the event kind, the person, the record kind or the event's details. */
  q?: string;
  /** The person who acted (user id). */
  actor?: string;
  /** First and last day (YYYY-MM-DD, inclusive) in `timeZone`. */
  from?: string;
  to?: string;
  timeZone?: string;
  /** Events of the gate itself and of every assessment of it. */
  gateId?: string;
}

/** `%` and `_` typed by a person are literal characters, not wildcards. */
function likePattern(text: string): string {
  return `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

/** The search and filters of the audit trail, as bound parameters only. */
function applyAuditFilters(query: Knex.QueryBuilder, options: AuditListOptions, knex: Knex): void {
  const zone = options.timeZone ?? 'UTC';
  if (options.action) query.andWhere('action', options.action);
  if (options.entityId) query.andWhere('entity_id', options.entityId);
  if (options.actor) query.andWhere('actor_user_id', options.actor);
  // Whole days in the organisation's zone: from its first instant to the next day's first.
  if (options.from)
    query.andWhereRaw('created_at >= (?::date)::timestamp at time zone ?', [options.from, zone]);
  if (options.to)
    query.andWhereRaw('created_at < ((?::date) + 1)::timestamp at time zone ?', [options.to, zone]);
  if (options.gateId) {
    const gateId = options.gateId;
    query.andWhere((w) =>
      w
        .where('entity_id', gateId)
        .orWhereRaw("detail ->> 'gateId' = ?", [gateId])
        .orWhereIn('entity_id', gateAssessmentIdsAsText(knex, gateId)),
    );
  }
  if (options.q) {
    const pattern = likePattern(options.q);
    query.andWhere((w) =>
      w
        .whereILike('action', pattern)
        .orWhereILike('actor_label', pattern)
        .orWhereILike('entity_type', pattern)
        .orWhereRaw('detail::text ilike ?', [pattern]),
    );
  }
}

export async function listAuditEvents(
  organisationId: string,
  options: AuditListOptions,
  knex: Knex = db(),
): Promise<AuditPage> {
  const query = knex('audit_events').where('organisation_id', organisationId);
  if (options.before) query.andWhere('id', '<', options.before);
  applyAuditFilters(query, options, knex);
  const rows = (await query
    .orderBy('id', 'desc')
    .limit(options.limit + 1)
    .select(rowColumns(knex))) as StoredRow[];
  const page = rows.slice(0, options.limit);
  return {
    items: page.map((row) => ({
      id: Number(row.id),
      at: iso(row.created_at),
      actorUserId: row.actor_user_id,
      actorLabel: row.actor_label,
      action: row.action,
      entityType: row.entity_type,
      entityId: row.entity_id,
      ip: row.ip,
      detail: row.detail ?? {},
      hash: row.hash,
    })),
    nextBefore: rows.length > options.limit ? Number(page.at(-1)!.id) : null,
  };
}

function recomputedHash(row: StoredRow): string {
  return auditHash(row.prev_hash, {
    organisation_id: row.organisation_id,
    actor_user_id: row.actor_user_id,
    actor_label: row.actor_label,
    action: row.action,
    entity_type: row.entity_type,
    entity_id: row.entity_id,
    ip: row.ip,
    detail: row.detail,
    created_at: iso(row.created_at),
  });
}

const BATCH = 2000;

/**
 * Walks the whole chain in one snapshot and reports on `organisationId`'s part of it, and
 * checks the stored anchors and `supplied` ones (from a signed report or an export's
 * `audit-trail-head.json`) against it.
 */
export async function verifyOrganisationTrail(
  organisationId: string,
  knex: Knex = db(),
  supplied: AuditAnchor[] = [],
): Promise<TrailVerification> {
  return knex.transaction(
    async (trx) => {
      let previousHash = genesisHash;
      let lastId = 0;
      let chainLength = 0;
      let checked = 0;
      let firstBrokenId: number | null = null;
      let brokenBy: TrailVerification['brokenBy'] = null;
      let brokenElsewhere = 0;
      for (;;) {
        const rows = (await trx('audit_events')
          .where('id', '>', lastId)
          .orderBy('id')
          .limit(BATCH)
          .select(rowColumns(trx))) as StoredRow[];
        if (!rows.length) break;
        for (const row of rows) {
          const linkBroken = row.prev_hash !== previousHash;
          const contentBroken = !linkBroken && recomputedHash(row) !== row.hash;
          const ours = row.organisation_id === organisationId;
          if (ours) checked++;
          if (linkBroken || contentBroken) {
            if (!ours) brokenElsewhere++;
            else if (firstBrokenId === null) {
              firstBrokenId = Number(row.id);
              brokenBy = linkBroken ? 'link' : 'content';
            }
          }
          previousHash = row.hash;
          lastId = Number(row.id);
          chainLength++;
        }
      }
      const lastEventId = chainLength ? lastId : null;
      const [stored] = (
        await trx.raw<{ rows: { anchors: string; latest: string | null; broken: string }[] }>(
          `select count(*) as anchors, max(a.event_id) as latest,
                  count(*) filter (where (e.id is null and a.event_id <= ?) or e.hash <> a.event_hash) as broken
             from audit_anchors a left join audit_events e on e.id = a.event_id`,
          [lastId],
        )
      ).rows;
      const states = await checkAnchors(trx, supplied);
      let anchoredEventId = stored?.latest == null ? 0 : Number(stored.latest);
      supplied.forEach((anchor, i) => {
        if (states[i] === 'truncated') anchoredEventId = Math.max(anchoredEventId, anchor.eventId);
      });
      const truncated =
        anchoredEventId > lastId ? { anchoredEventId, lastEventId, message: TRUNCATED_MESSAGE } : null;
      const anchorsBroken =
        Number(stored?.broken ?? 0) + states.filter((s) => s === 'altered' || s === 'missing').length;
      return {
        ok: firstBrokenId === null && !truncated && anchorsBroken === 0,
        checked,
        chainLength,
        firstBrokenId,
        brokenBy,
        brokenElsewhere,
        anchorsChecked: Number(stored?.anchors ?? 0) + supplied.length,
        anchorsBroken,
        truncated,
        verifiedAt: new Date().toISOString(),
      };
    },
    { isolationLevel: 'repeatable read', readOnly: true },
  );
}

/** What the filter lists offer: the event kinds and the people found in the organisation's trail. */
export async function auditFilterChoices(
  organisationId: string,
  knex: Knex = db(),
): Promise<{ actions: string[]; people: Array<{ id: string; label: string }> }> {
  const [actions, people] = await Promise.all([
    knex('audit_events').where('organisation_id', organisationId).distinct('action').orderBy('action'),
    knex('audit_events')
      .where('organisation_id', organisationId)
      .whereNotNull('actor_user_id')
      .groupBy('actor_user_id')
      .select<{ actor_user_id: string; label: string | null }[]>(
        'actor_user_id',
        knex.raw('max(actor_label) as label'),
      )
      .orderBy('label'),
  ]);
  return {
    actions: actions.map((r: { action: string }) => r.action),
    people: people.map((p) => ({ id: p.actor_user_id, label: p.label ?? 'Unknown person' })),
  };
}
