/**
 * Signing links: the token is 32 random bytes in the e-mail, only its SHA-256 in the database.
 * A link is live until used, replaced by a newer one, or past its expiry; the public page and
 * the PDF behind it read a live link only and never change anything.
 */
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { db } from '../db';
import { documentById, type DocumentRecord } from '../documents';
import { ConflictError, GoneError, NotFoundError, type DomainError } from '../errors';
import { cautionsOf, verdictWords, type ReportCaution, type Verdict } from '../pdf/report-model';
import { loadFrozenAssessment } from '../assessments';
import { CONSENT_TEXT, INTENT_TEXT } from './schemas';

export const tokenPattern = /^[A-Za-z0-9_-]{43}$/;
export const hashToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex');

export type LinkState = 'ok' | 'used' | 'expired' | 'revoked' | 'unknown';

const linkMessages: Record<Exclude<LinkState, 'ok'>, string> = {
  unknown: 'This signing link is not valid. Check that the whole link was copied, or ask for a new one.',
  used: 'This signing link has already been used: the report is signed.',
  expired: 'This signing link has expired. Ask the office for a new one.',
  revoked: 'This signing link was replaced by a newer one. Use the link in the most recent e-mail.',
};

/** Why a link cannot be used: unknown is not found, used a conflict, expired or replaced gone. */
export function linkProblem(state: Exclude<LinkState, 'ok'>): DomainError {
  const message = linkMessages[state];
  const details = { linkState: state };
  if (state === 'unknown') return new NotFoundError({ message }, details);
  if (state === 'used') return new ConflictError(message, details);
  return new GoneError(message, details);
}

export function linkStateMessage(state: Exclude<LinkState, 'ok'>): string {
  return linkMessages[state];
}

export interface SignRequestRow {
  id: string;
  organisation_id: string;
  assessment_id: string;
  recipient_email: string;
  recipient_name: string;
  document_id: string;
  expires_at: Date;
  used_at: Date | null;
  revoked_at: Date | null;
  created_at: Date;
  expired: boolean;
}

export async function findRequest(knex: Knex, token: string, lock: boolean): Promise<SignRequestRow | null> {
  if (!tokenPattern.test(token)) return null;
  const query = knex('sign_requests')
    .where({ token_hash: hashToken(token) })
    .first<SignRequestRow | undefined>(
      'id',
      'organisation_id',
      'assessment_id',
      'recipient_email',
      'recipient_name',
      'document_id',
      'expires_at',
      'used_at',
      'revoked_at',
      'created_at',
      knex.raw('expires_at <= now() as expired'),
    );
  if (lock) query.forUpdate();
  return (await query) ?? null;
}

export function stateOf(request: SignRequestRow | null): LinkState {
  if (!request) return 'unknown';
  if (request.used_at) return 'used';
  if (request.revoked_at) return 'revoked';
  if (request.expired) return 'expired';
  return 'ok';
}

export interface SignPageView {
  state: 'ok';
  organisationName: string;
  clientName: string;
  recipientEmail: string;
  gateLabel: string;
  siteLine: string;
  verdict: Verdict;
  verdictLabel: string;
  verdictHeadline: string;
  verdictMeaning: string;
  fixes: Array<{ ruleId: string; title: string; severity: string; remediation: string }>;
  cautions: ReportCaution[];
  documentSha256: string;
  expiresAt: string;
  /** The organisation's time zone, for the expiry and dates on the page. */
  timeZone: string;
  auditorName: string;
  consentText: string;
  intentText: string;
}

/** What the public signing page shows for a token; never changes anything. */
export async function describeSignLink(
  token: string,
  knex: Knex = db(),
): Promise<SignPageView | { state: Exclude<LinkState, 'ok'> }> {
  const request = await findRequest(knex, token, false);
  const state = stateOf(request);
  if (state !== 'ok' || !request) return { state: state === 'ok' ? 'unknown' : state };
  // The frozen record only: the page shows what was judged and sent, whatever changed since.
  const frozen = await loadFrozenAssessment(knex, request.organisation_id, request.assessment_id);
  const document = await knex('documents').where({ id: request.document_id }).first('sha256');
  if (!frozen?.record || !document || frozen.status !== 'awaiting_signature') return { state: 'unknown' };
  const { record } = frozen;
  const words = verdictWords[record.result.verdict];
  const order = ['critical', 'major', 'minor'];
  return {
    state: 'ok',
    organisationName: record.organisation.name,
    clientName: record.client.name,
    recipientEmail: request.recipient_email,
    gateLabel: record.gate.label,
    siteLine: [record.site.name, record.site.addressLine1, record.site.city].filter(Boolean).join(', '),
    verdict: record.result.verdict,
    verdictLabel: words.label,
    verdictHeadline: words.headline,
    verdictMeaning: words.meaning,
    fixes: record.result.findings
      .filter((f) => f.outcome === 'fail')
      .sort((a, b) => order.indexOf(a.severity) - order.indexOf(b.severity))
      .map((f) => ({ ruleId: f.ruleId, title: f.title, severity: f.severity, remediation: f.remediation })),
    cautions: cautionsOf(record.result),
    documentSha256: document.sha256,
    expiresAt: new Date(request.expires_at).toISOString(),
    timeZone: frozen.timeZone,
    auditorName: record.auditor.name,
    consentText: CONSENT_TEXT,
    intentText: INTENT_TEXT,
  };
}

/** The stored copy for signature behind a live link, or the link's state when it is not live. */
export async function signingCopyForLink(
  token: string,
  knex: Knex = db(),
): Promise<{ state: 'ok'; document: DocumentRecord } | { state: Exclude<LinkState, 'ok'> }> {
  const request = await findRequest(knex, token, false);
  const state = stateOf(request);
  if (state !== 'ok' || !request) return { state: state === 'ok' ? 'unknown' : state };
  const document = await documentById(knex, request.document_id);
  return document ? { state: 'ok', document } : { state: 'unknown' };
}
