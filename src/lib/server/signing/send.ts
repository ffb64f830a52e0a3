/**
 * Sending a scored assessment for signature: the copy for signature rendered and stored, a new
 * single-use link (older ones revoked), the e-mail queued, the status moved to
 * `awaiting_signature` and the audit event written, all in one transaction.
 */
import { randomBytes, randomUUID } from 'node:crypto';
import { recordAudit } from '../audit';
import { linkOrigin } from '../auth/public-origin';
import { db } from '../db';
import { storeDocument, type DocumentRecord } from '../documents';
import { ConflictError, ForbiddenError, InvalidInputError, NotFoundError } from '../errors';
import { enqueueMail, wakeOutboxWorker } from '../outbox';
import {
  loadFrozenAssessment,
  lockAssessment,
  markAwaitingSignature,
  SENDABLE_STATUSES,
} from '../assessments';
import { renderAssessmentReport } from '../reports';
import type { SessionUser } from '../session-user';
import { hashToken } from './links';
import { signRequestMail } from './mails';
import { SIGN_LINK_DEFAULT_DAYS } from './schemas';

export interface RequestFacts {
  ip: string | null;
  userAgent: string | null;
}

export interface SentForSignature {
  signRequestId: string;
  assessmentId: string;
  recipient: string;
  expiresAt: string;
  document: DocumentRecord;
  outboxMessageId: string;
}

/**
 * Renders and stores the copy for signature, opens a new single-use link (revoking any older
 * one), queues the e-mail and moves the assessment to `awaiting_signature`, in one transaction.
 */
export async function sendForSignature(
  viewer: SessionUser,
  assessmentId: string,
  options: { expiresInDays?: number; recipient?: string } & RequestFacts,
): Promise<SentForSignature> {
  const knex = db();
  const before = await loadFrozenAssessment(knex, viewer.organisationId, assessmentId);
  if (!before) throw new NotFoundError('That assessment');
  if (viewer.role === 'auditor' && before.auditorId !== viewer.id)
    throw new ForbiddenError('An auditor sends their own assessments only.');
  if (!before.record || !SENDABLE_STATUSES.includes(before.status)) {
    throw new ConflictError(
      `Only a scored assessment can be sent for signature; this one is ${before.status.replace(/_/g, ' ')}.`,
    );
  }
  // The record's people and places: what was judged, not what the rows say today.
  const { record } = before;
  const chosen = options.recipient?.trim() || null;
  const recipient = chosen ?? record.client.contactEmail;
  if (!recipient) {
    throw new InvalidInputError('The client has no contact e-mail address to send the link to.', [
      {
        field: 'recipient',
        message: 'choose who receives the link, or add the client’s e-mail address first',
      },
    ]);
  }
  const documentId = randomUUID();
  const pdf = await renderAssessmentReport(viewer.organisationId, assessmentId, {
    kind: 'signing_copy',
    documentId,
  });
  if (!pdf) throw new NotFoundError('That assessment');
  const token = randomBytes(32).toString('base64url');
  const days = options.expiresInDays ?? SIGN_LINK_DEFAULT_DAYS;
  // Never the host the request names: see public-origin.ts.
  const link = `${linkOrigin()}/sign/${token}`;

  const sent = await knex.transaction(async (trx) => {
    const locked = await lockAssessment(trx, assessmentId, viewer.organisationId);
    if (
      !locked ||
      !SENDABLE_STATUSES.includes(locked.status) ||
      locked.resultSha256 !== record.resultSha256
    ) {
      throw new ConflictError('The assessment changed while the report was being prepared. Try again.');
    }
    const document = await storeDocument(trx, {
      id: documentId,
      organisationId: viewer.organisationId,
      assessmentId,
      kind: 'signing_copy',
      bytes: pdf,
      filename: `gate-report-${assessmentId.slice(0, 8)}-for-signature.pdf`,
      createdBy: viewer.id,
    });
    await trx('sign_requests')
      .where({ assessment_id: assessmentId })
      .whereNull('used_at')
      .whereNull('revoked_at')
      .update({ revoked_at: trx.fn.now() });
    const [request] = await trx('sign_requests')
      .insert({
        organisation_id: viewer.organisationId,
        assessment_id: assessmentId,
        token_hash: hashToken(token),
        recipient_email: recipient,
        recipient_name: record.client.name,
        document_id: document.id,
        expires_at: trx.raw(`now() + (? * interval '1 day')`, [days]),
        created_by: viewer.id,
      })
      .returning(['id', 'expires_at']);
    await markAwaitingSignature(trx, assessmentId);
    const mail = signRequestMail({
      organisationName: record.organisation.name,
      clientName: record.client.name,
      gateLabel: record.gate.label,
      siteLine: [record.site.name, record.site.addressLine1, record.site.city].filter(Boolean).join(', '),
      verdict: record.result.verdict,
      link,
      expiresAt: new Date(request.expires_at),
      timeZone: before.timeZone,
    });
    const outboxMessageId = await enqueueMail(trx, {
      organisationId: viewer.organisationId,
      kind: 'sign_request',
      to: [recipient],
      subject: mail.subject,
      text: mail.text,
      html: mail.html,
      relatedType: 'assessment',
      relatedId: assessmentId,
    });
    await recordAudit(trx, {
      organisationId: viewer.organisationId,
      actorUserId: viewer.id,
      actorLabel: viewer.email,
      action: 'assessment.sent_for_signature',
      entityType: 'assessment',
      entityId: assessmentId,
      ip: options.ip,
      detail: {
        signRequestId: request.id,
        recipient,
        recipientChosen: chosen !== null,
        clientContactEmail: record.client.contactEmail ?? null,
        expiresAt: new Date(request.expires_at).toISOString(),
        documentId: document.id,
        documentSha256: document.sha256,
        outboxMessageId,
      },
    });
    return {
      signRequestId: request.id,
      assessmentId,
      recipient,
      expiresAt: new Date(request.expires_at).toISOString(),
      document,
      outboxMessageId,
    };
  });
  wakeOutboxWorker();
  return sent;
}
