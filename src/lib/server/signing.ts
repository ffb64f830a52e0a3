/**
 * Sending a scored assessment for the owner's signature, the public signing link, and the
 * signature itself with the final, digitally signed document.
 *
 * - The link carries a random token; only its SHA-256 is stored. It works once, expires
 *   (14 days by default) and is revoked by a newer link.
 * - The PDF the signer reads is rendered and stored when the link is sent; the submit names
 *   its SHA-256 and the server refuses a mismatch, so the record says exactly what was shown.
 * - Signing locks the link row (`FOR UPDATE`) and `signatures` is unique per link and per
 *   assessment, so a double submit signs once.
 * - The final PDF is rendered once inside the signing transaction, signed with the
 *   organisation's certificate, stored content-addressed and mailed through the outbox.
 */
import { createHash, randomBytes, randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { z } from 'zod';
import { recordAudit } from './audit';
import { db } from './db';
import { documentById, storeDocument, type DocumentRecord } from './documents';
import { HttpProblem } from './http/problem';
import { enqueueMail, wakeOutboxWorker } from './outbox';
import { signPdfWithCertificate } from './pdf/digital-signature';
import { organisationCertificate } from './pdf/organisation-certificate';
import { cautionsOf, StoredResultSchema, verdictWords, type ReportCaution, type Verdict } from './pdf/report-model';
import { loadAssessmentForReport, renderAssessmentReport } from './reports';
import type { SessionUser } from './session-user';
import { storage } from './storage';

export const SIGN_LINK_DEFAULT_DAYS = 14;
export const SIGN_LINK_MAX_DAYS = 60;

/** Shown beside the consent checkbox and stored with the signature, word for word. */
export const CONSENT_TEXT = 'I agree to sign this acknowledgement electronically. My typed name and the mark I make here count as my handwritten signature.';

/** Shown beside the sign button and stored with the signature, word for word. */
export const INTENT_TEXT =
  'By signing, I confirm that I received and read this gate safety report and each caution I ticked. Signing does not say that any repair has been done.';

/** A drawn signature is a small PNG; anything bigger is not from the signature pad. */
const MAX_SIGNATURE_PNG_BYTES = 400 * 1024;
export const SIGNATURE_BODY_LIMIT = 700 * 1024;

const tokenPattern = /^[A-Za-z0-9_-]{43}$/;
const hashToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex');

export const SendForSignatureSchema = z.strictObject({
  expiresInDays: z
    .number()
    .int('must be a whole number of days')
    .min(1, 'must be at least 1 day')
    .max(SIGN_LINK_MAX_DAYS, `must be at most ${SIGN_LINK_MAX_DAYS} days`)
    .optional(),
});

const pngDataUrl = z
  .string()
  .max(SIGNATURE_BODY_LIMIT)
  .regex(/^data:image\/png;base64,[A-Za-z0-9+/]+={0,2}$/, 'must be a PNG data URL');

export const SignatureSubmitSchema = z.strictObject({
  name: z
    .string()
    .trim()
    .min(2, 'type your full name')
    .max(120, 'must be at most 120 characters')
    .refine((v) => !/[\u0000-\u001f]/.test(v), 'must not contain control characters'),
  consent: z.literal(true, 'tick the box to agree to sign electronically'),
  intent: z.literal(true, 'confirm that you mean to sign'),
  acknowledgedCautions: z.array(z.string().max(200)).max(500),
  shownPdfSha256: z.string().regex(/^[0-9a-f]{64}$/, 'must be the SHA-256 of the report shown'),
  signature: z.discriminatedUnion('method', [z.strictObject({ method: z.literal('drawn'), png: pngDataUrl }), z.strictObject({ method: z.literal('typed') })]),
});
export type SignatureSubmit = z.infer<typeof SignatureSubmitSchema>;

export type LinkState = 'ok' | 'used' | 'expired' | 'revoked' | 'unknown';

const linkMessages: Record<Exclude<LinkState, 'ok'>, { status: number; detail: string }> = {
  unknown: { status: 404, detail: 'This signing link is not valid. Check that the whole link was copied, or ask for a new one.' },
  used: { status: 409, detail: 'This signing link has already been used: the report is signed.' },
  expired: { status: 410, detail: 'This signing link has expired. Ask the office for a new one.' },
  revoked: { status: 410, detail: 'This signing link was replaced by a newer one. Use the link in the most recent e-mail.' },
};

export function linkProblem(state: Exclude<LinkState, 'ok'>): HttpProblem {
  const { status, detail } = linkMessages[state];
  return new HttpProblem(status, detail, { linkState: state });
}

export function linkStateMessage(state: Exclude<LinkState, 'ok'>): string {
  return linkMessages[state].detail;
}

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
  options: { expiresInDays?: number; origin: string } & RequestFacts,
): Promise<SentForSignature> {
  const knex = db();
  const before = await loadAssessmentForReport(knex, viewer.organisationId, assessmentId);
  if (!before) throw new HttpProblem(404, 'That assessment was not found.');
  if (viewer.role === 'auditor' && before.auditor_id !== viewer.id) throw new HttpProblem(403, 'An auditor sends their own assessments only.');
  if (!statusesThatMaySend.includes(before.status)) {
    throw new HttpProblem(409, `Only a scored assessment can be sent for signature; this one is ${before.status.replace(/_/g, ' ')}.`);
  }
  const recipient = before.client_contact_email;
  if (!recipient) {
    throw new HttpProblem(422, 'The client has no contact e-mail address to send the link to.', {
      errors: [{ field: 'client.contactEmail', message: 'add the client’s e-mail address first' }],
    });
  }
  const documentId = randomUUID();
  const pdf = await renderAssessmentReport(viewer.organisationId, assessmentId, { kind: 'signing_copy', documentId });
  if (!pdf) throw new HttpProblem(404, 'That assessment was not found.');
  const token = randomBytes(32).toString('base64url');
  const days = options.expiresInDays ?? SIGN_LINK_DEFAULT_DAYS;
  const link = `${options.origin}/sign/${token}`;

  const sent = await knex.transaction(async (trx) => {
    const locked = await trx('assessments').where({ id: assessmentId, organisation_id: viewer.organisationId }).forUpdate().first('status', 'result_sha256');
    if (!locked || !statusesThatMaySend.includes(locked.status) || locked.result_sha256 !== before.result_sha256) {
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
    await trx('sign_requests').where({ assessment_id: assessmentId }).whereNull('used_at').whereNull('revoked_at').update({ revoked_at: trx.fn.now() });
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
      .update({ status: 'awaiting_signature', row_version: trx.raw('row_version + 1'), updated_at: trx.fn.now() });
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
        expiresAt: new Date(request.expires_at).toISOString(),
        documentId: document.id,
        documentSha256: document.sha256,
        outboxMessageId,
      },
    });
    return { signRequestId: request.id, assessmentId, recipient, expiresAt: new Date(request.expires_at).toISOString(), document, outboxMessageId };
  });
  wakeOutboxWorker();
  return sent;
}

function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

function formatDay(date: Date, timeZone: string): string {
  try {
    return new Intl.DateTimeFormat('en-US', { timeZone, dateStyle: 'long' }).format(date);
  } catch {
    return date.toISOString().slice(0, 10);
  }
}

export function signRequestMail(input: {
  organisationName: string;
  clientName: string;
  gateLabel: string;
  siteLine: string;
  verdict: Verdict;
  link: string;
  expiresAt: Date;
  timeZone: string;
}): { subject: string; text: string; html: string } {
  const words = verdictWords[input.verdict];
  const until = formatDay(input.expiresAt, input.timeZone);
  const subject = `Please read and sign: gate safety report for ${input.gateLabel}`;
  const text = [
    `Hello ${input.clientName},`,
    '',
    `${input.organisationName} has assessed the ${input.gateLabel} at ${input.siteLine}.`,
    `Verdict: ${words.label}. ${words.headline}`,
    '',
    'Please read the report and acknowledge it, with its cautions, on this page (no account needed):',
    input.link,
    '',
    `The link works once and expires on ${until}.`,
    'If you did not expect this message, you can ignore it.',
    '',
    input.organisationName,
  ].join('\n');
  const html = `<p>Hello ${escapeHtml(input.clientName)},</p>
<p>${escapeHtml(input.organisationName)} has assessed the ${escapeHtml(input.gateLabel)} at ${escapeHtml(input.siteLine)}.</p>
<p><strong>Verdict: ${escapeHtml(words.label)}.</strong> ${escapeHtml(words.headline)}</p>
<p><a href="${escapeHtml(input.link)}">Read and sign the report</a> (no account needed). The link works once and expires on ${escapeHtml(until)}.</p>
<p>If you did not expect this message, you can ignore it.</p>
<p>${escapeHtml(input.organisationName)}</p>`;
  return { subject, text, html };
}

interface SignRequestRow {
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

async function findRequest(knex: Knex, token: string, lock: boolean): Promise<SignRequestRow | null> {
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

function stateOf(request: SignRequestRow | null): LinkState {
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
  auditorName: string;
  consentText: string;
  intentText: string;
}

/** What the public signing page shows for a token; never changes anything. */
export async function describeSignLink(token: string, knex: Knex = db()): Promise<SignPageView | { state: Exclude<LinkState, 'ok'> }> {
  const request = await findRequest(knex, token, false);
  const state = stateOf(request);
  if (state !== 'ok' || !request) return { state: state === 'ok' ? 'unknown' : state };
  const row = await loadAssessmentForReport(knex, request.organisation_id, request.assessment_id);
  const document = await knex('documents').where({ id: request.document_id }).first('sha256');
  const result = StoredResultSchema.safeParse(row?.result);
  if (!row || !document || !result.success || row.status !== 'awaiting_signature') return { state: 'unknown' };
  const words = verdictWords[result.data.verdict];
  const order = ['critical', 'major', 'minor'];
  return {
    state: 'ok',
    organisationName: row.org_name,
    clientName: row.client_name,
    recipientEmail: request.recipient_email,
    gateLabel: row.gate_label,
    siteLine: [row.site_name, row.address_line1, row.city].filter(Boolean).join(', '),
    verdict: result.data.verdict,
    verdictLabel: words.label,
    verdictHeadline: words.headline,
    verdictMeaning: words.meaning,
    fixes: result.data.findings
      .filter((f) => f.outcome === 'fail')
      .sort((a, b) => order.indexOf(a.severity) - order.indexOf(b.severity))
      .map((f) => ({ ruleId: f.ruleId, title: f.title, severity: f.severity, remediation: f.remediation })),
    cautions: cautionsOf(result.data),
    documentSha256: document.sha256,
    expiresAt: new Date(request.expires_at).toISOString(),
    auditorName: row.auditor_name,
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

function decodeSignaturePng(dataUrl: string): Buffer {
  const bytes = Buffer.from(dataUrl.slice(dataUrl.indexOf(',') + 1), 'base64');
  // PNG signature (ISO/IEC 15948, 5.2): 89 50 4E 47 0D 0A 1A 0A.
  const isPng = bytes.length > 8 && bytes.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
  if (!isPng) throw new HttpProblem(422, 'The drawn signature is not a PNG image.', { errors: [{ field: 'signature.png', message: 'must be a PNG image' }] });
  if (bytes.length > MAX_SIGNATURE_PNG_BYTES) throw new HttpProblem(413, 'The drawn signature image is too large.');
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
export async function submitSignature(token: string, body: SignatureSubmit, facts: RequestFacts): Promise<SignedOutcome> {
  if (!tokenPattern.test(token)) throw linkProblem('unknown');
  const png = body.signature.method === 'drawn' ? decodeSignaturePng(body.signature.png) : null;
  const knex = db();
  const outcome = await knex.transaction(async (trx) => {
    // Lock order: the assessment, then the link, the same order as sending a new link takes,
    // so a resend racing a signature waits instead of deadlocking.
    const unlocked = await findRequest(trx, token, false);
    if (!unlocked) throw linkProblem('unknown');
    const assessment = await trx('assessments').where({ id: unlocked.assessment_id }).forUpdate().first('id', 'status', 'result', 'organisation_id');
    const request = await findRequest(trx, token, true);
    const state = stateOf(request);
    if (state !== 'ok' || !request) throw linkProblem(state === 'ok' ? 'unknown' : state);
    if (!assessment || assessment.status !== 'awaiting_signature') throw new HttpProblem(409, 'This report is no longer waiting for a signature.');
    const shown = await trx('documents').where({ id: request.document_id }).first('sha256');
    if (!shown || shown.sha256 !== body.shownPdfSha256) {
      throw new HttpProblem(409, 'The report you are signing is not the one this link shows. Reload the page and read it again.', {
        errors: [{ field: 'shownPdfSha256', message: 'does not match the report for this link' }],
      });
    }
    const result = StoredResultSchema.parse(assessment.result);
    const cautions = cautionsOf(result);
    const acknowledged = new Set(body.acknowledgedCautions);
    const missing = cautions.filter((c) => !acknowledged.has(c.ruleId));
    if (missing.length) {
      throw new HttpProblem(422, 'Tick each caution to show you have read it.', {
        errors: missing.map((c) => ({ field: `acknowledgedCautions.${c.ruleId}`, message: `not acknowledged: ${c.title}` })),
      });
    }
    const unknown = body.acknowledgedCautions.filter((id) => !cautions.some((c) => c.ruleId === id));
    if (unknown.length)
      throw new HttpProblem(422, 'Some acknowledged cautions are not in this report.', {
        errors: unknown.map((id) => ({ field: `acknowledgedCautions.${id}`, message: 'not a caution of this report' })),
      });

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
        cautions_acknowledged: JSON.stringify(cautions.map((c) => ({ ruleId: c.ruleId, title: c.title, caution: c.caution }))),
        shown_pdf_sha256: shown.sha256,
        ip: facts.ip,
        user_agent: facts.userAgent?.slice(0, 500) ?? null,
      })
      .returning(['id', 'signed_at']);
    await trx('sign_requests').where({ id: request.id }).update({ used_at: trx.fn.now() });

    const row = await loadAssessmentForReport(trx, request.organisation_id, request.assessment_id);
    if (!row) throw new HttpProblem(404, 'That assessment was not found.');
    const signedAt = new Date(signature.signed_at);
    const documentId = randomUUID();
    const pdf = await renderAssessmentReport(
      request.organisation_id,
      request.assessment_id,
      {
        kind: 'signed_report',
        documentId,
        signing: {
          assessor: { name: row.auditor_name, signedAt: new Date(request.created_at) },
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
        },
      },
      trx,
    );
    if (!pdf) throw new HttpProblem(404, 'That assessment was not found.');
    const certificate = organisationCertificate({ id: row.organisation_id, name: row.org_name });
    const signedPdf = await signPdfWithCertificate(pdf, certificate.p12, certificate.passphrase, {
      reason: `Gate safety assessment ${row.id}, acknowledged by ${body.name}`,
      name: row.org_name,
      contactInfo: row.auditor_email,
      location: [row.city, row.region].filter(Boolean).join(', '),
      signingTime: signedAt,
    });
    const document = await storeDocument(trx, {
      id: documentId,
      organisationId: row.organisation_id,
      assessmentId: row.id,
      kind: 'signed_report',
      bytes: signedPdf,
      filename: `gate-report-${row.id.slice(0, 8)}-signed.pdf`,
      createdBy: null,
    });
    await trx('assessments')
      .where({ id: row.id })
      .update({ status: 'signed', signed_at: signedAt, row_version: trx.raw('row_version + 1'), updated_at: trx.fn.now() });

    const attachment = { filename: document.filename, contentType: 'application/pdf', storageKey: document.sha256 };
    const ownerMail = signedReportMail({
      kind: 'owner',
      organisationName: row.org_name,
      gateLabel: row.gate_label,
      signerName: body.name,
      sha256: document.sha256,
      documentId,
    });
    await enqueueMail(trx, {
      organisationId: row.organisation_id,
      kind: 'signed_report',
      to: [request.recipient_email],
      subject: ownerMail.subject,
      text: ownerMail.text,
      attachments: [attachment],
      relatedType: 'assessment',
      relatedId: row.id,
    });
    const office = await organisationRecipients(trx, row.organisation_id);
    if (office.length) {
      const copy = signedReportMail({
        kind: 'organisation',
        organisationName: row.org_name,
        gateLabel: row.gate_label,
        signerName: body.name,
        sha256: document.sha256,
        documentId,
      });
      await enqueueMail(trx, {
        organisationId: row.organisation_id,
        kind: 'signed_report_copy',
        to: office,
        subject: copy.subject,
        text: copy.text,
        attachments: [attachment],
        relatedType: 'assessment',
        relatedId: row.id,
      });
    }
    await recordAudit(trx, {
      organisationId: row.organisation_id,
      actorLabel: `${body.name} <${request.recipient_email}> (signing link)`,
      action: 'assessment.signed',
      entityType: 'assessment',
      entityId: row.id,
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
    return { assessmentId: row.id, signatureId: signature.id, document, signedAt: signedAt.toISOString() };
  });
  wakeOutboxWorker();
  return outcome;
}

/** Who gets the organisation's copy: the office people, else the owners. */
async function organisationRecipients(knex: Knex, organisationId: string): Promise<string[]> {
  const staff = await knex('users').where({ organisation_id: organisationId, active: true }).whereIn('role', ['office', 'owner']).select('email', 'role');
  const office = staff.filter((s) => s.role === 'office');
  return (office.length ? office : staff).map((s) => s.email);
}

export function signedReportMail(input: {
  kind: 'owner' | 'organisation';
  organisationName: string;
  gateLabel: string;
  signerName: string;
  sha256: string;
  documentId: string;
}): { subject: string; text: string } {
  if (input.kind === 'owner') {
    return {
      subject: `Your signed gate safety report: ${input.gateLabel}`,
      text: [
        `Hello ${input.signerName},`,
        '',
        `Thank you for signing. Your copy of the gate safety report for the ${input.gateLabel} is attached, signed by you and digitally signed by ${input.organisationName}.`,
        'Keep it with the gate’s papers. Please follow the cautions you acknowledged until the fixes are done.',
        '',
        `Document ${input.documentId}`,
        `SHA-256 ${input.sha256}`,
        '',
        input.organisationName,
      ].join('\n'),
    };
  }
  return {
    subject: `Signed: gate safety report for ${input.gateLabel} (${input.signerName})`,
    text: [
      `${input.signerName} signed the gate safety report for the ${input.gateLabel}. The signed document is attached and kept in the archive.`,
      '',
      `Document ${input.documentId}`,
      `SHA-256 ${input.sha256}`,
    ].join('\n'),
  };
}
