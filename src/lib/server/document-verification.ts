/**
 * Public verification of a signed report: given the SHA-256 of a PDF (or the PDF itself) or a
 * document id, say whether it is a signed report in the archive, when it was signed, by which
 * organisation and with which certificate (its fingerprint, subject and issuer, read from the
 * archived file) — and nothing else: no client, address, findings or file.
 *
 * Only final signed reports count. The signing copy a homeowner was shown is not "genuine" on
 * its own: it was never signed.
 */
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { joinAssessment } from './assessments';
import { anchorOfPdf, anchorStateWords, checkAnchors, type AnchorState } from './audit-anchors';
import { admitFromAddress, waitInWords } from './auth/throttle';
import { db } from './db';
import { consumeBody, type TooLarge } from './http/body';
import { iso } from './listing';
import { signerCertificateOfPdf, type CertificateFacts } from './pdf/certificate-facts';
import { storage } from './storage';

/** The certificate that signed the file: what a reader's signature details show, to compare. */
export type SigningCertificateAnswer = Pick<CertificateFacts, 'sha256' | 'subject' | 'issuer' | 'selfSigned'>;

/** Whether the audit trail still holds the chain head the signed report recorded (audit-anchors.ts). */
export interface TrailAnswer {
  eventId: number;
  state: AnchorState;
  message: string;
}

export type VerificationAnswer =
  /** `auditTrail` only for a report that carries the trail's head (signed since reports do). */
  | {
      match: true;
      documentId: string;
      signedAt: string;
      organisation: string;
      certificate?: SigningCertificateAnswer;
      auditTrail?: TrailAnswer;
    }
  | { match: false };

export type DocumentReference = { sha256: string } | { documentId: string };

/** Parses what a visitor typed: a UUID is a document id, 64 hex digits a SHA-256. */
export function referenceOf(text: string): DocumentReference | null {
  const value = text.trim().toLowerCase();
  if (/^[0-9a-f]{64}$/.test(value)) return { sha256: value };
  if (/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/.test(value))
    return { documentId: value };
  return null;
}

/**
 * Admits one public check from this address, or says how long to wait. Checking is public and
 * takes uploads of up to 30 MB, so every check counts against the address (throttle.ts, kind
 * `verify`); a check without a known address is admitted.
 */
export async function admitVerification(
  ip: string | null,
  knex: Knex = db(),
): Promise<{ admitted: true } | { admitted: false; retryAfterSeconds: number }> {
  if (!ip) return { admitted: true };
  const verdict = await admitFromAddress(knex, 'verify', ip);
  return verdict.throttled
    ? { admitted: false, retryAfterSeconds: verdict.retryAfterSeconds }
    : { admitted: true };
}

/** What a throttled visitor is told (API detail and page alike). */
export function verificationWaitMessage(retryAfterSeconds: number): string {
  return `Too many reports checked from this address. Try again in ${waitInWords(retryAfterSeconds)}.`;
}

export function sha256Of(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

export async function verifyDocument(
  reference: DocumentReference,
  knex: Knex = db(),
): Promise<VerificationAnswer> {
  const query = joinAssessment(
    knex('documents as d').join('organisations as o', 'o.id', 'd.organisation_id'),
    'd.assessment_id',
  )
    .leftJoin('signatures as s', 's.assessment_id', 'd.assessment_id')
    .where('d.kind', 'signed_report');
  if ('sha256' in reference) query.andWhere('d.sha256', reference.sha256);
  else query.andWhere('d.id', reference.documentId);
  const row = await query
    .orderBy('d.created_at')
    .first<
      | { id: string; sha256: string; organisation: string; signed_at: Date | null; created_at: Date }
      | undefined
    >(
      'd.id',
      'd.sha256',
      'o.name as organisation',
      knex.raw('coalesce(s.signed_at, a.signed_at) as signed_at'),
      'd.created_at',
    );
  if (!row) return { match: false };
  const answer: VerificationAnswer = {
    match: true,
    documentId: row.id,
    signedAt: iso(row.signed_at ?? row.created_at),
    organisation: row.organisation,
  };
  // Read from the archive's own copy, so the fingerprint and trail head are those of the genuine file.
  const pdf = await storage()
    .get(row.sha256)
    .catch(() => null);
  const signer = pdf ? signerCertificateOfPdf(pdf) : null;
  if (signer)
    answer.certificate = {
      sha256: signer.sha256,
      subject: signer.subject,
      issuer: signer.issuer,
      selfSigned: signer.selfSigned,
    };
  const auditTrail = pdf ? await trailAnswer(pdf, knex) : null;
  if (auditTrail) answer.auditTrail = auditTrail;
  return answer;
}

/**
 * Checks the chain head the signed report carries against the trail; null for a report signed
 * before reports carried one.
 */
async function trailAnswer(bytes: Buffer, knex: Knex): Promise<TrailAnswer | null> {
  const anchor = await anchorOfPdf(bytes);
  if (!anchor) return null;
  const [state] = await checkAnchors(knex, [anchor]);
  return { eventId: anchor.eventId, state: state!, message: anchorStateWords[state!] };
}

/** SHA-256 of a request body hashed as it streams in, refusing it past `limit` bytes (body.ts). */
export async function streamedSha256(request: Request, limit: number, tooLarge: TooLarge): Promise<string> {
  const hash = createHash('sha256');
  await consumeBody(request, limit, (chunk) => hash.update(chunk), tooLarge);
  return hash.digest('hex');
}

/**
 * The time zone of the organisation whose archive holds a signed report: the verify page shows
 * the signing time there to a visitor who has no organisation of their own.
 */
export async function timeZoneOfDocument(documentId: string, knex: Knex = db()): Promise<string | null> {
  const row = await knex('documents as d')
    .join('organisations as o', 'o.id', 'd.organisation_id')
    .where('d.id', documentId)
    .first<{ time_zone: string } | undefined>('o.time_zone');
  return row?.time_zone ?? null;
}
