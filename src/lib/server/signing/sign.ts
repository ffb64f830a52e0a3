/**
 * The owner's signature and the final document, in one transaction: nothing changes unless the
 * link is live, the shown PDF's hash matches and every caution is ticked. The assessment row
 * is locked before the link row (the order sending takes), `signatures` is unique per link
 * and per assessment, so a double submit signs once. The final PDF is rendered once, signed
 * with the organisation's certificate, stored content-addressed and mailed through the outbox.
 */
import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { recordAudit } from '../audit';
import { chainHead, recordAnchor } from '../audit-anchors';
import { db } from '../db';
import { storeDocument, type DocumentRecord } from '../documents';
import { ConflictError, InvalidInputError, NotFoundError, TooLargeError } from '../errors';
import { enqueueMail, wakeOutboxWorker } from '../outbox';
import { signPdfWithCertificate } from '../pdf/digital-signature';
import { signingCertificateFor } from '../signing-certificates';
import { linkOrigin } from '../auth/public-origin';
import { cautionsOf } from '../pdf/report-model';
import { loadFrozenAssessment, lockAssessment, markSigned } from '../assessments';
import { renderAssessmentReport } from '../reports';
import { storage } from '../storage';
import { findRequest, linkProblem, stateOf, tokenPattern } from './links';
import { signedReportMail } from './mails';
import { CONSENT_TEXT, INTENT_TEXT, MAX_SIGNATURE_PNG_BYTES, type SignatureSubmit } from './schemas';
import type { RequestFacts } from './send';

function decodeSignaturePng(dataUrl: string): Buffer {
  const bytes = Buffer.from(dataUrl.slice(dataUrl.indexOf(',') + 1), 'base64');
  // PNG signature (ISO/IEC 15948, 5.2): 89 50 4E 47 0D 0A 1A 0A.
  const isPng =
    bytes.length > 8 &&
    bytes.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
  if (!isPng)
    throw new InvalidInputError('The drawn signature is not a PNG image.', [
      { field: 'signature.png', message: 'must be a PNG image' },
    ]);
  if (bytes.length > MAX_SIGNATURE_PNG_BYTES)
    throw new TooLargeError('The drawn signature image is too large.');
  return bytes;
}

export interface SignedOutcome {
  assessmentId: string;
  signatureId: string;
  document: DocumentRecord;
  signedAt: string;
}

/**
 * Records the owner's signature and produces the final document, all in one transaction:
 * nothing changes unless the link is live, the shown PDF's hash matches and every caution is
 * acknowledged.
 */
export async function submitSignature(
  token: string,
  body: SignatureSubmit,
  facts: RequestFacts,
): Promise<SignedOutcome> {
  if (!tokenPattern.test(token)) throw linkProblem('unknown');
  const png = body.signature.method === 'drawn' ? decodeSignaturePng(body.signature.png) : null;
  const knex = db();
  const outcome = await knex.transaction(async (trx) => {
    // Lock order: the assessment, then the link, the same order as sending a new link takes,
    // so a resend racing a signature waits instead of deadlocking.
    const unlocked = await findRequest(trx, token, false);
    if (!unlocked) throw linkProblem('unknown');
    const assessment = await lockAssessment(trx, unlocked.assessment_id, null);
    const request = await findRequest(trx, token, true);
    const state = stateOf(request);
    if (state !== 'ok' || !request) throw linkProblem(state === 'ok' ? 'unknown' : state);
    if (!assessment || assessment.status !== 'awaiting_signature')
      throw new ConflictError('This report is no longer waiting for a signature.');
    const shown = await trx('documents').where({ id: request.document_id }).first('sha256');
    if (!shown || shown.sha256 !== body.shownPdfSha256) {
      throw new ConflictError(
        'The report you are signing is not the one this link shows. Reload the page and read it again.',
        {
          errors: [{ field: 'shownPdfSha256', message: 'does not match the report for this link' }],
        },
      );
    }
    // The cautions of the frozen record: the ones the signing copy and page showed.
    const frozen = await loadFrozenAssessment(trx, assessment.organisationId, assessment.id);
    if (!frozen?.record) throw new ConflictError('This report is no longer waiting for a signature.');
    const { record } = frozen;
    const cautions = cautionsOf(record.result);
    const acknowledged = new Set(body.acknowledgedCautions);
    const missing = cautions.filter((c) => !acknowledged.has(c.ruleId));
    if (missing.length) {
      throw new InvalidInputError(
        'Tick each caution to show you have read it.',
        missing.map((c) => ({
          field: `acknowledgedCautions.${c.ruleId}`,
          message: `not acknowledged: ${c.title}`,
        })),
      );
    }
    const unknown = body.acknowledgedCautions.filter((id) => !cautions.some((c) => c.ruleId === id));
    if (unknown.length)
      throw new InvalidInputError(
        'Some acknowledged cautions are not in this report.',
        unknown.map((id) => ({
          field: `acknowledgedCautions.${id}`,
          message: 'not a caution of this report',
        })),
      );

    const imageKey = png ? (await storage().put(png, 'image/png')).key : null;
    const [signature] = await trx('signatures')
      .insert({
        organisation_id: request.organisation_id,
        assessment_id: request.assessment_id,
        sign_request_id: request.id,
        signer_name: body.name,
        signer_email: request.recipient_email,
        consent_text: CONSENT_TEXT,
        consented: true,
        intent_text: INTENT_TEXT,
        signature_method: body.signature.method,
        signature_image_key: imageKey,
        cautions_acknowledged: JSON.stringify(
          cautions.map((c) => ({ ruleId: c.ruleId, title: c.title, caution: c.caution })),
        ),
        shown_pdf_sha256: shown.sha256,
        ip: facts.ip,
        user_agent: facts.userAgent?.slice(0, 500) ?? null,
      })
      .returning(['id', 'signed_at']);
    await trx('sign_requests').where({ id: request.id }).update({ used_at: trx.fn.now() });

    const signedAt = new Date(signature.signed_at);
    const documentId = randomUUID();
    // Chosen before rendering: the report names the certificate that signs it.
    const certificate = await signingCertificateFor(
      { id: assessment.organisationId, name: record.organisation.name },
      trx,
    );
    // The trail's head goes into the signed PDF, so the file itself can later show a trail cut short.
    const auditHead = await chainHead(trx);
    const pdf = await renderAssessmentReport(
      request.organisation_id,
      request.assessment_id,
      {
        kind: 'signed_report',
        documentId,
        signing: {
          assessor: { name: record.auditor.name, signedAt: new Date(request.created_at) },
          owner: {
            name: body.name,
            email: request.recipient_email,
            signedAt,
            method: body.signature.method,
            imagePng: png,
            ip: facts.ip,
            userAgent: facts.userAgent,
            shownPdfSha256: shown.sha256,
            consentText: CONSENT_TEXT,
            intentText: INTENT_TEXT,
            cautionsAcknowledged: cautions.map((c) => ({ ruleId: c.ruleId, title: c.title })),
          },
          certificate: certificate.facts,
          // The public address every e-mailed link uses (absolute even with none configured); the
          // signer's request (Host, X-Forwarded-*) never names it.
          verifyUrl: `${linkOrigin()}/verify`,
          auditHead,
        },
      },
      trx,
    );
    if (!pdf) throw new NotFoundError('That assessment');
    const signedPdf = await signPdfWithCertificate(pdf, certificate.p12, certificate.passphrase, {
      reason: `Gate safety assessment ${assessment.id}, acknowledged by ${body.name}`,
      name: record.organisation.name,
      contactInfo: record.auditor.email,
      location: [record.site.city, record.site.region].filter(Boolean).join(', '),
      signingTime: signedAt,
    });
    const document = await storeDocument(trx, {
      id: documentId,
      organisationId: assessment.organisationId,
      assessmentId: assessment.id,
      kind: 'signed_report',
      bytes: signedPdf,
      filename: `gate-report-${assessment.id.slice(0, 8)}-signed.pdf`,
      createdBy: null,
    });
    if (auditHead)
      await recordAnchor(trx, auditHead, {
        organisationId: assessment.organisationId,
        kind: 'signed_report',
        reference: documentId,
      });
    await markSigned(trx, assessment.id, signedAt);

    const attachment = {
      filename: document.filename,
      contentType: 'application/pdf',
      storageKey: document.sha256,
    };
    const ownerMail = signedReportMail({
      kind: 'owner',
      organisationName: record.organisation.name,
      gateLabel: record.gate.label,
      signerName: body.name,
      sha256: document.sha256,
      documentId,
      verdict: record.result.verdict,
    });
    await enqueueMail(trx, {
      organisationId: assessment.organisationId,
      kind: 'signed_report',
      to: [request.recipient_email],
      subject: ownerMail.subject,
      text: ownerMail.text,
      attachments: [attachment],
      relatedType: 'assessment',
      relatedId: assessment.id,
    });
    const office = await organisationRecipients(trx, assessment.organisationId);
    if (office.length) {
      const copy = signedReportMail({
        kind: 'organisation',
        organisationName: record.organisation.name,
        gateLabel: record.gate.label,
        signerName: body.name,
        sha256: document.sha256,
        documentId,
        verdict: record.result.verdict,
      });
      await enqueueMail(trx, {
        organisationId: assessment.organisationId,
        kind: 'signed_report_copy',
        to: office,
        subject: copy.subject,
        text: copy.text,
        attachments: [attachment],
        relatedType: 'assessment',
        relatedId: assessment.id,
      });
    }
    await recordAudit(trx, {
      organisationId: assessment.organisationId,
      actorLabel: `${body.name} <${request.recipient_email}> (signing link)`,
      action: 'assessment.signed',
      entityType: 'assessment',
      entityId: assessment.id,
      ip: facts.ip,
      detail: {
        signatureId: signature.id,
        signRequestId: request.id,
        method: body.signature.method,
        shownPdfSha256: shown.sha256,
        documentId,
        documentSha256: document.sha256,
      },
    });
    return {
      assessmentId: assessment.id,
      signatureId: signature.id,
      document,
      signedAt: signedAt.toISOString(),
    };
  });
  wakeOutboxWorker();
  return outcome;
}

/** Who gets the organisation's copy: the office people, else the owners. */
async function organisationRecipients(knex: Knex, organisationId: string): Promise<string[]> {
  const staff = await knex('users')
    .where({ organisation_id: organisationId, active: true })
    .whereIn('role', ['office', 'owner'])
    .select('email', 'role');
  const office = staff.filter((s) => s.role === 'office');
  return (office.length ? office : staff).map((s) => s.email);
}
