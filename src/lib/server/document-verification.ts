/**
 * Public verification of a signed report: given the SHA-256 of a PDF (or the PDF itself) or a
 * document id, say whether it is a signed report in the archive, when it was signed and by
 * which organisation — and nothing else: no client, address, findings or file.
 *
 * Only final signed reports count. The signing copy a homeowner was shown is not "genuine" on
 * its own: it was never signed.
 */
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { admitFromAddress, waitInWords } from './auth/throttle';
import { db } from './db';
import { consumeBody, type TooLarge } from './http/body';
import { iso } from './listing';

export type VerificationAnswer = { match: true; documentId: string; signedAt: string; organisation: string } | { match: false };

export type DocumentReference = { sha256: string } | { documentId: string };

/** Parses what a visitor typed: a UUID is a document id, 64 hex digits a SHA-256. */
export function referenceOf(text: string): DocumentReference | null {
  const value = text.trim().toLowerCase();
  if (/^[0-9a-f]{64}$/.test(value)) return { sha256: value };
  if (/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/.test(value)) return { documentId: value };
  return null;
}

/**
 * Admits one public check from this address, or says how long to wait. Checking is public and
 * takes uploads of up to 30 MB, so every check counts against the address (throttle.ts, kind
 * `verify`); a check without a known address is admitted.
 */
export async function admitVerification(ip: string | null, knex: Knex = db()): Promise<{ admitted: true } | { admitted: false; retryAfterSeconds: number }> {
  if (!ip) return { admitted: true };
  const verdict = await admitFromAddress(knex, 'verify', ip);
  return verdict.throttled ? { admitted: false, retryAfterSeconds: verdict.retryAfterSeconds } : { admitted: true };
}

/** What a throttled visitor is told (API detail and page alike). */
export function verificationWaitMessage(retryAfterSeconds: number): string {
  return `Too many reports checked from this address. Try again in ${waitInWords(retryAfterSeconds)}.`;
}

export function sha256Of(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

export async function verifyDocument(reference: DocumentReference, knex: Knex = db()): Promise<VerificationAnswer> {
  const query = knex('documents as d')
    .join('organisations as o', 'o.id', 'd.organisation_id')
    .join('assessments as a', 'a.id', 'd.assessment_id')
    .leftJoin('signatures as s', 's.assessment_id', 'd.assessment_id')
    .where('d.kind', 'signed_report');
  if ('sha256' in reference) query.andWhere('d.sha256', reference.sha256);
  else query.andWhere('d.id', reference.documentId);
  const row = await query
    .orderBy('d.created_at')
    .first<{ id: string; organisation: string; signed_at: Date | null; created_at: Date } | undefined>(
      'd.id',
      'o.name as organisation',
      knex.raw('coalesce(s.signed_at, a.signed_at) as signed_at'),
      'd.created_at',
    );
  if (!row) return { match: false };
  return { match: true, documentId: row.id, signedAt: iso(row.signed_at ?? row.created_at), organisation: row.organisation };
}

/** SHA-256 of a request body hashed as it streams in, refusing it past `limit` bytes (body.ts). */
export async function streamedSha256(request: Request, limit: number, tooLarge: TooLarge): Promise<string> {
  const hash = createHash('sha256');
  await consumeBody(request, limit, (chunk) => hash.update(chunk), tooLarge);
  return hash.digest('hex');
}
