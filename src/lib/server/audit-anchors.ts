/**
 * Anchors of the audit trail outside its table. A hash chain shows an edited or removed event
 * in the middle, but not the newest events removed from the end: what is left is still a
 * valid chain. So every signed report and every archive export carries the chain head when it
 * was made (latest event id and hash): in the PDF's keywords and its signing record, and as
 * `audit-trail-head.json` in the ZIP. A copy goes into `audit_anchors`. Verification then
 * checks that each anchored event is still there with the same hash; a trail whose last event
 * is older than an anchored one has lost its end.
 */
import type { Knex } from 'knex';
import { PDFDocument } from 'pdf-lib';

export interface AuditAnchor {
  eventId: number;
  hash: string;
}

/** What an anchor says about the trail as it is now. */
export type AnchorState = 'present' | 'altered' | 'missing' | 'truncated';

export const TRUNCATED_MESSAGE = 'The trail ends before an event that a signed document or export recorded.';

export const anchorStateWords: Record<AnchorState, string> = {
  present: 'The audit trail still holds the event this document recorded, unchanged.',
  altered:
    'The event this document recorded is in the audit trail with a different hash: the trail was rewritten.',
  missing: 'The event this document recorded was removed from the audit trail.',
  truncated: TRUNCATED_MESSAGE,
};

/** The latest committed event. Writers append under one lock, so committed events are always a prefix of the chain. */
export async function chainHead(knex: Knex): Promise<AuditAnchor | null> {
  const row = await knex('audit_events')
    .orderBy('id', 'desc')
    .first<{ id: string; hash: string } | undefined>('id', 'hash');
  return row ? { eventId: Number(row.id), hash: row.hash } : null;
}

export async function recordAnchor(
  trx: Knex.Transaction,
  anchor: AuditAnchor,
  source: { organisationId: string | null; kind: 'signed_report' | 'archive_export'; reference: string },
): Promise<void> {
  await trx('audit_anchors').insert({
    organisation_id: source.organisationId,
    kind: source.kind,
    reference: source.reference,
    event_id: anchor.eventId,
    event_hash: anchor.hash,
  });
}

/** `<event id>:<hash>`, the form anchors travel in (PDF keywords, query strings). */
export function anchorText(anchor: AuditAnchor): string {
  return `${anchor.eventId}:${anchor.hash}`;
}

export function parseAnchor(text: string): AuditAnchor | null {
  const match = /^(\d{1,15}):([0-9a-f]{64})$/.exec(text.trim().toLowerCase());
  return match ? { eventId: Number(match[1]), hash: match[2]! } : null;
}

/** The word in a signed PDF's keywords that carries its anchor. */
export const pdfAnchorKeyword = 'audit-head';

/** The anchor a signed report carries in its keywords, or null (an older report, or not ours). */
export async function anchorOfPdf(bytes: Uint8Array): Promise<AuditAnchor | null> {
  try {
    const pdf = await PDFDocument.load(bytes, { updateMetadata: false, ignoreEncryption: true });
    const keywords = pdf.getKeywords() ?? '';
    const match = new RegExp(`${pdfAnchorKeyword} (\\S+)`).exec(keywords);
    return match ? parseAnchor(match[1]!) : null;
  } catch {
    return null;
  }
}

/** Where each anchor stands against the trail, read in the caller's snapshot. */
export async function checkAnchors(knex: Knex, anchors: AuditAnchor[]): Promise<AnchorState[]> {
  if (!anchors.length) return [];
  const rows = (await knex('audit_events')
    .whereIn(
      'id',
      anchors.map((a) => a.eventId),
    )
    .select('id', 'hash')) as { id: string; hash: string }[];
  const found = new Map(rows.map((r) => [Number(r.id), r.hash]));
  const last = await knex('audit_events').max<{ max: string | null }>('id as max').first();
  const lastId = last?.max == null ? 0 : Number(last.max);
  return anchors.map((anchor) => {
    const hash = found.get(anchor.eventId);
    if (hash === undefined) return anchor.eventId > lastId ? 'truncated' : 'missing';
    return hash === anchor.hash ? 'present' : 'altered';
  });
}
