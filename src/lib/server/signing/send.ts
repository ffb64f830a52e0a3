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
import { HttpProblem } from '../http/problem';
import { enqueueMail, wakeOutboxWorker } from '../outbox';
import { StoredResultSchema, type Verdict } from '../pdf/report-model';
import { loadAssessmentForReport, renderAssessmentReport } from '../reports';
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

const statusesThatMaySend = ['scored', 'awaiting_signature'];

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
  const before = await loadAssessmentForReport(knex, viewer.organisationId, assessmentId);
  if (!before) throw new HttpProblem(404, 'That assessment was not found.');
  if (viewer.role === 'auditor' && before.auditor_id !== viewer.id)
    throw new HttpProblem(403, 'An auditor sends their own assessments only.');
  if (!statusesThatMaySend.includes(before.status)) {
    throw new HttpProblem(
      409,
      `Only a scored assessment can be sent for signature; this one is ${before.status.replace(/_/g, ' ')}.`,
    );
  }
  const chosen = options.recipient?.trim() || null;
  const recipient = chosen ?? before.client_contact_email;
  if (!recipient) {
    throw new HttpProblem(422, 'The client has no contact e-mail address to send the link to.', {
      errors: [
        {
          field: 'recipient',
          message: 'choose who receives the link, or add the client’s e-mail address first',
        },
      ],
    });
  }
  const documentId = randomUUID();
  const pdf = await renderAssessmentReport(viewer.organisationId, assessmentId, {
    kind: 'signing_copy',
    documentId,
  });
  if (!pdf) throw new HttpProblem(404, 'That assessment was not found.');
  const token = randomBytes(32).toString('base64url');
  const days = options.expiresInDays ?? SIGN_LINK_DEFAULT_DAYS;
  // Never the host the request names: see public-origin.ts.
  const link = `${linkOrigin()}/sign/${token}`;

  const sent = await knex.transaction(async (trx) => {
    const locked = await trx('assessments')
      .where({ id: assessmentId, organisation_id: viewer.organisationId })
      .forUpdate()
      .first('status', 'result_sha256');
    if (
      !locked ||
      !statusesThatMaySend.includes(locked.status) ||
      locked.result_sha256 !== before.result_sha256
    ) {
      throw new HttpProblem(409, 'The assessment changed while the report was being prepared. Try again.');
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
        recipient_name: before.client_name,
        document_id: document.id,
        expires_at: trx.raw(`now() + (? * interval '1 day')`, [days]),
        created_by: viewer.id,
      })
      .returning(['id', 'expires_at']);
    await trx('assessments')
      .where({ id: assessmentId })
      .update({
        status: 'awaiting_signature',
        row_version: trx.raw('row_version + 1'),
        updated_at: trx.fn.now(),
      });
    const mail = signRequestMail({
      organisationName: before.org_name,
      clientName: before.client_name,
      gateLabel: before.gate_label,
      siteLine: [before.site_name, before.address_line1, before.city].filter(Boolean).join(', '),
      verdict: (StoredResultSchema.safeParse(before.result).data?.verdict ?? 'remedy') as Verdict,
      link,
      expiresAt: new Date(request.expires_at),
      timeZone: before.org_time_zone,
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
        clientContactEmail: before.client_contact_email ?? null,
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
