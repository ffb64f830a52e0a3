/** Read side of signing for staff: an assessment's links and its signature record. */
import type { Knex } from 'knex';

export interface SigningStatus {
  signRequests: Array<{
    id: string;
    recipient: string;
    expiresAt: string;
    usedAt: string | null;
    revokedAt: string | null;
    createdAt: string;
    state: 'open' | 'used' | 'expired' | 'revoked';
  }>;
  signature: {
    id: string;
    signerName: string;
    signerEmail: string;
    method: 'drawn' | 'typed';
    signedAt: string;
    ip: string | null;
    userAgent: string | null;
    shownPdfSha256: string;
    cautionsAcknowledged: unknown;
  } | null;
}

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

export async function signingStatus(
  knex: Knex,
  organisationId: string,
  assessmentId: string,
): Promise<SigningStatus> {
  const requests = await knex('sign_requests')
    .where({ organisation_id: organisationId, assessment_id: assessmentId })
    .orderBy('created_at', 'desc')
    .select(
      'id',
      'recipient_email',
      'expires_at',
      'used_at',
      'revoked_at',
      'created_at',
      knex.raw('expires_at <= now() as expired'),
    );
  const signature = await knex('signatures')
    .where({ organisation_id: organisationId, assessment_id: assessmentId })
    .first(
      'id',
      'signer_name',
      'signer_email',
      'signature_method',
      'signed_at',
      knex.raw('host(ip) as ip'),
      'user_agent',
      'shown_pdf_sha256',
      'cautions_acknowledged',
    );
  return {
    signRequests: requests.map((r) => ({
      id: r.id,
      recipient: r.recipient_email,
      expiresAt: iso(r.expires_at)!,
      usedAt: iso(r.used_at),
      revokedAt: iso(r.revoked_at),
      createdAt: iso(r.created_at)!,
      state: r.used_at ? 'used' : r.revoked_at ? 'revoked' : r.expired ? 'expired' : 'open',
    })),
    signature: signature
      ? {
          id: signature.id,
          signerName: signature.signer_name,
          signerEmail: signature.signer_email,
          method: signature.signature_method,
          signedAt: iso(signature.signed_at)!,
          ip: signature.ip,
          userAgent: signature.user_agent,
          shownPdfSha256: signature.shown_pdf_sha256,
          cautionsAcknowledged: signature.cautions_acknowledged,
        }
      : null,
  };
}
