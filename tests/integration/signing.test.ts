/**
 * From a scored assessment to the archived, signed report, over HTTP against the built server:
 * the office sends it, the homeowner opens the link without an account, reads the PDF, ticks
 * the cautions, signs; the signed PDF arrives by mail on both sides, pdfsig validates it, and
 * the database refuses any change to the signed assessment and its documents.
 */
import { createHash } from 'node:crypto';
import { execFileSync, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { simpleParser } from 'mailparser';
import sharp from 'sharp';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { extractPdfText } from '../support/pdf-text';
import {
  anonymousClient,
  createOrganisation,
  signIn,
  signInHomeowner,
  fixturePassword,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { seedScoredAssessment, type SeededAssessment } from './support/signing-seed';

const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

interface CaughtSummary {
  id: string;
  to: string[];
  subject: string;
  receivedAt: string;
  attachments: Array<{ index: number; filename: string | null; sha256: string; contentType: string }>;
}

/**
 * Waits for a caught message to `to` whose subject matches (and, when given, that carries the
 * outbox id the API answered with), and parses its raw source with mailparser.
 */
async function caughtMail(to: string, subject: RegExp, outboxId?: string, timeoutMs = 15_000) {
  const catcherUrl = inject('catcherUrl');
  const deadline = Date.now() + timeoutMs;
  const seen = new Set<string>();
  for (;;) {
    const list = (await (await fetch(`${catcherUrl}/messages`)).json()) as CaughtSummary[];
    for (const m of list) {
      if (
        seen.has(m.id) ||
        !m.to.some((t) => t.toLowerCase() === to.toLowerCase()) ||
        !subject.test(m.subject)
      )
        continue;
      const raw = Buffer.from(await (await fetch(`${catcherUrl}/messages/${m.id}/raw`)).arrayBuffer());
      const parsed = await simpleParser(raw);
      if (!outboxId || parsed.headers.get('x-latchwell-outbox-id') === outboxId)
        return { summary: m, parsed };
      seen.add(m.id);
    }
    if (Date.now() > deadline) throw new Error(`no mail to ${to} matching ${subject} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

function signLink(text: string): { url: URL; token: string } {
  const match = /https?:\/\/\S+\/sign\/([A-Za-z0-9_-]{43})/.exec(text);
  if (!match) throw new Error(`no signing link in:\n${text}`);
  return { url: new URL(match[0]), token: match[1] };
}

async function signaturePng(): Promise<string> {
  const svg = Buffer.from(
    '<svg xmlns="http://www.w3.org/2000/svg" width="600" height="160"><path d="M20 120 C 80 20, 140 20, 180 100 S 300 150, 360 60 S 480 40, 560 110" stroke="#121c29" stroke-width="5" fill="none"/></svg>',
  );
  const png = await sharp(svg).png().toBuffer();
  return `data:image/png;base64,${png.toString('base64')}`;
}

let org: FixtureOrganisation;
let office: TestClient;
let auditor: TestClient;

beforeAll(async () => {
  org = await createOrganisation('signing');
  [office, auditor] = await Promise.all([
    signIn(org.office.email, fixturePassword),
    signIn(org.auditor.email, fixturePassword),
  ]);
});

async function seeded(photos = 2): Promise<SeededAssessment> {
  return seedScoredAssessment(
    testDb(),
    { id: org.id, auditorId: org.auditor.id, clientId: org.clientId },
    { dataDir: inject('dataDir'), photos },
  );
}

async function sendAndOpen(assessmentId: string, by: TestClient = office) {
  const since = Date.now();
  const res = await by.json('POST', `/api/assessments/${assessmentId}/send-for-signature`, {});
  expect(res.status, await res.clone().text()).toBe(202);
  const sent = await res.json();
  const clientEmail = (await testDb()('clients').where({ id: org.clientId }).first('contact_email'))
    .contact_email as string;
  // Several links go to the same client address: pick this one by the outbox id in its headers.
  const mail = await caughtMail(clientEmail, /Please read and sign/, sent.message.id);
  expect(Date.parse(mail.summary.receivedAt)).toBeGreaterThanOrEqual(since - 1000);
  const link = signLink(mail.parsed.text ?? '');
  return { sent, mail, clientEmail, ...link };
}

async function outboxDrained(timeoutMs = 20_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const [{ n }] = await testDb()('outbox_messages')
      .where({ organisation_id: org.id })
      .whereIn('status', ['queued', 'sending'])
      .count({ n: '*' });
    if (Number(n) === 0) return;
    if (Date.now() > deadline) throw new Error('outbox messages of this organisation are still waiting');
    await new Promise((r) => setTimeout(r, 100));
  }
}

async function submit(token: string, body: Record<string, unknown>) {
  return anonymousClient().json('POST', `/api/sign/${token}/submit`, body);
}

describe('sending a scored assessment for signature and signing it', () => {
  let assessment: SeededAssessment;
  let token: string;
  let shownSha: string;
  let cautionIds: string[];
  let clientEmail: string;
  let signedDocument: { id: string; sha256: string };

  it('queues one e-mail with a single-use link to the client contact and moves the assessment to awaiting_signature', async () => {
    assessment = await seeded();
    const opened = await sendAndOpen(assessment.assessmentId);
    token = opened.token;
    clientEmail = opened.clientEmail;
    expect(
      opened.mail.parsed.to && 'value' in opened.mail.parsed.to ? opened.mail.parsed.to.value[0].address : '',
    ).toBe(clientEmail);
    expect(opened.mail.parsed.subject).toBe('Please read and sign: gate safety report for Driveway gate');
    expect(opened.mail.parsed.text).toContain('Take out of automatic use');
    expect(opened.sent.signRequest.recipient).toBe(clientEmail);
    const row = await testDb()('assessments').where({ id: assessment.assessmentId }).first('status');
    expect(row.status).toBe('awaiting_signature');
    // Only the hash of the token is stored.
    const stored = await testDb()('sign_requests')
      .where({ assessment_id: assessment.assessmentId })
      .first('token_hash');
    expect(stored.token_hash).toBe(createHash('sha256').update(token).digest('hex'));
    const audit = await testDb()('audit_events')
      .where({ entity_id: assessment.assessmentId, action: 'assessment.sent_for_signature' })
      .first('id');
    expect(audit).toBeTruthy();
  });

  it('shows the signing page without an account: verdict, fixes, each caution and the PDF fingerprint', async () => {
    const res = await anonymousClient().fetch(`/sign/${token}`);
    expect(res.status).toBe(200);
    expect(res.headers.get('referrer-policy')).toBe('no-referrer');
    const html = await res.text();
    expect(html).toContain('name="viewport" content="width=device-width, initial-scale=1"');
    expect(html).toContain('Take out of automatic use');
    shownSha = /data-document-sha256>([0-9a-f]{64})</.exec(html)?.[1] ?? '';
    expect(shownSha).toMatch(/^[0-9a-f]{64}$/);
    cautionIds = assessment.result.findings.filter((f) => f.outcome === 'fail').map((f) => f.ruleId);
    for (const f of assessment.result.findings.filter((x) => x.outcome === 'fail'))
      expect(html).toContain(f.caution);
  });

  it('serves the exact PDF shown for signature, whose text carries verdict, findings, references and the disclaimer', async () => {
    const res = await anonymousClient().fetch(`/api/sign/${token}/report.pdf`);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/pdf');
    const pdf = new Uint8Array(await res.arrayBuffer());
    expect(sha256(pdf)).toBe(shownSha);
    const text = await extractPdfText(pdf);
    expect(text).toContain('Take out of automatic use');
    const failing = assessment.result.findings.filter((f) => f.outcome === 'fail');
    for (const f of failing) {
      expect(text).toContain(f.title);
      expect(text).toContain(`${f.reference.standard}, ${f.reference.clause}`);
      expect(text).toContain(f.remediation);
    }
    expect(text).toContain('does not replace');
    expect(text).toContain('authority having jurisdiction');
    expect(text).toContain('licensed professionals');
    expect(text).toContain('Fixture residential gate checks');
    expect(text).toMatch(/Page 1 of \d+/);
    expect(text).toContain('Copy for signature');
  });

  it('refuses a signature that skips a caution or names another PDF, and changes nothing', async () => {
    const base = {
      name: 'Imke Quillfeather',
      consent: true,
      intent: true,
      shownPdfSha256: shownSha,
      signature: { method: 'typed' },
    };
    const skipped = await submit(token, { ...base, acknowledgedCautions: cautionIds.slice(1) });
    expect(skipped.status).toBe(422);
    expect((await skipped.json()).errors[0].field).toBe(`acknowledgedCautions.${cautionIds[0]}`);
    const otherPdf = await submit(token, {
      ...base,
      acknowledgedCautions: cautionIds,
      shownPdfSha256: 'e'.repeat(64),
    });
    expect(otherPdf.status).toBe(409);
    const noConsent = await submit(token, { ...base, consent: false, acknowledgedCautions: cautionIds });
    expect(noConsent.status).toBe(422);
    const notPng = await submit(token, {
      ...base,
      acknowledgedCautions: cautionIds,
      signature: {
        method: 'drawn',
        png: `data:image/png;base64,${Buffer.from('GIF89a not a png at all').toString('base64')}`,
      },
    });
    expect(notPng.status).toBe(422);
    expect((await notPng.json()).errors[0].field).toBe('signature.png');
    const unknownField = await submit(token, {
      ...base,
      acknowledgedCautions: cautionIds,
      signedFor: 'someone else',
    });
    expect(unknownField.status).toBe(422);
    expect(
      await testDb()('signatures').where({ assessment_id: assessment.assessmentId }).first(),
    ).toBeUndefined();
    expect(
      (await testDb()('sign_requests').where({ assessment_id: assessment.assessmentId }).first('used_at'))
        .used_at,
    ).toBeNull();
  });

  it('signs once: records name, consent, intent, drawn signature, IP, user agent and the shown PDF hash, then archives a signed PDF', async () => {
    const res = await anonymousClient().fetch(`/api/sign/${token}/submit`, {
      method: 'POST',
      headers: {
        'content-type': 'application/json',
        'user-agent': 'Mozilla/5.0 (Linux; Android 14; Pixel) Mobile LatchwellTest/1',
        'x-forwarded-for': '203.0.113.7',
      },
      body: JSON.stringify({
        name: 'Imke Quillfeather',
        consent: true,
        intent: true,
        acknowledgedCautions: cautionIds,
        shownPdfSha256: shownSha,
        signature: { method: 'drawn', png: await signaturePng() },
      }),
    });
    expect(res.status, await res.clone().text()).toBe(201);
    const body = await res.json();
    signedDocument = body.document;
    const signature = await testDb()('signatures')
      .where({ assessment_id: assessment.assessmentId })
      .first('*', testDb().raw('host(ip) as ip_text'));
    expect(signature.signer_name).toBe('Imke Quillfeather');
    expect(signature.signer_email).toBe(clientEmail);
    expect(signature.consented).toBe(true);
    expect(signature.consent_text).toMatch(/sign this acknowledgement electronically/);
    expect(signature.intent_text).toMatch(/received and read/);
    expect(signature.signature_method).toBe('drawn');
    expect(signature.signature_image_key).toMatch(/^[0-9a-f]{64}$/);
    expect(signature.shown_pdf_sha256).toBe(shownSha);
    expect(signature.ip_text).toBe('203.0.113.7');
    expect(signature.user_agent).toContain('LatchwellTest/1');
    expect(signature.cautions_acknowledged.map((c: { ruleId: string }) => c.ruleId)).toEqual(cautionIds);
    const row = await testDb()('assessments')
      .where({ id: assessment.assessmentId })
      .first('status', 'signed_at');
    expect(row.status).toBe('signed');
    expect(row.signed_at).toBeTruthy();
    const document = await testDb()('documents').where({ id: signedDocument.id }).first();
    expect(document.kind).toBe('signed_report');
    expect(document.sha256).toBe(signedDocument.sha256);
  });

  it('mails the signed PDF to the owner and a copy to the office; the attachments hash to the stored document', async () => {
    const owner = await caughtMail(clientEmail, /Your signed gate safety report/);
    expect(owner.parsed.attachments).toHaveLength(1);
    expect(owner.parsed.attachments[0].contentType).toBe('application/pdf');
    expect(sha256(owner.parsed.attachments[0].content)).toBe(signedDocument.sha256);
    expect(owner.summary.attachments[0].sha256).toBe(signedDocument.sha256);
    const copy = await caughtMail(org.office.email, /^Signed: gate safety report/);
    expect(sha256(copy.parsed.attachments[0].content)).toBe(signedDocument.sha256);
    const status = await (await office.fetch(`/api/assessments/${assessment.assessmentId}/signing`)).json();
    expect(status.messages.every((m: { status: string }) => m.status === 'sent')).toBe(true);
    expect(status.signature.signerName).toBe('Imke Quillfeather');
  });

  it('produces a PDF whose digital signature pdfsig validates, and which pdfsig rejects after one byte changes', async () => {
    const res = await office.fetch(`/api/documents/${signedDocument.id}/file`);
    expect(res.status).toBe(200);
    const pdf = Buffer.from(await res.arrayBuffer());
    expect(sha256(pdf)).toBe(signedDocument.sha256);
    const text = await extractPdfText(pdf);
    expect(text).toContain('Signed report');
    expect(text).toContain('Imke Quillfeather');
    expect(text).toContain(shownSha);
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-pdfsig-'));
    try {
      const good = path.join(dir, 'signed.pdf');
      fs.writeFileSync(good, pdf);
      // ISO 32000-1 12.8.1: the byte range covers the whole file except the signature value.
      const report = execFileSync('pdfsig', [good], { encoding: 'utf8' });
      expect(report).toContain('Signature is Valid');
      expect(report).toContain('adbe.pkcs7.detached');
      expect(report).toContain('Total document signed');
      const altered = Buffer.from(pdf);
      const at = altered.indexOf('Check ') + 2; // a byte inside the signed range (page content)
      altered[at] ^= 0x01;
      const bad = path.join(dir, 'altered.pdf');
      fs.writeFileSync(bad, altered);
      const badReport = spawnSync('pdfsig', [bad], { encoding: 'utf8' });
      expect(`${badReport.stdout}${badReport.stderr}`).not.toContain('Signature is Valid');
      expect(`${badReport.stdout}${badReport.stderr}`).toMatch(/Digest Mismatch|Invalid/i);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });

  it('answers a reused link with a clear page and changes nothing', async () => {
    const page = await anonymousClient().fetch(`/sign/${token}`);
    expect(page.status).toBe(409);
    expect(await page.text()).toContain('already been used');
    const again = await submit(token, {
      name: 'Someone Else',
      consent: true,
      intent: true,
      acknowledgedCautions: cautionIds,
      shownPdfSha256: shownSha,
      signature: { method: 'typed' },
    });
    expect(again.status).toBe(409);
    expect((await again.json()).linkState).toBe('used');
    expect(
      await testDb()('signatures').where({ assessment_id: assessment.assessmentId }).count({ n: '*' }),
    ).toEqual([{ n: '1' }]);
    expect((await anonymousClient().fetch(`/api/sign/${token}/report.pdf`)).status).toBe(409);
  });

  it('refuses UPDATE and DELETE of the signed assessment and of its document rows at the database level', async () => {
    const knex = testDb();
    await expect(
      knex.raw(`update assessments set answers = '{}'::jsonb where id = ?`, [assessment.assessmentId]),
    ).rejects.toThrow(/read-only/);
    await expect(
      knex.raw(`update assessments set status = 'scored' where id = ?`, [assessment.assessmentId]),
    ).rejects.toThrow(/read-only/);
    await expect(
      knex.raw(`update assessments set status = 'superseded', verdict = 'clear' where id = ?`, [
        assessment.assessmentId,
      ]),
    ).rejects.toThrow(/read-only/);
    await expect(knex.raw(`delete from assessments where id = ?`, [assessment.assessmentId])).rejects.toThrow(
      /cannot be deleted/,
    );
    await expect(
      knex.raw(`update documents set sha256 = repeat('0', 64), storage_key = repeat('0', 64) where id = ?`, [
        signedDocument.id,
      ]),
    ).rejects.toThrow(/signed archive/);
    await expect(knex.raw(`delete from documents where id = ?`, [signedDocument.id])).rejects.toThrow(
      /signed archive/,
    );
    await expect(
      knex.raw(`update signatures set signer_name = 'Forged' where assessment_id = ?`, [
        assessment.assessmentId,
      ]),
    ).rejects.toThrow(/signed archive/);
    await expect(
      knex.raw(`update sign_requests set used_at = now() where assessment_id = ?`, [assessment.assessmentId]),
    ).rejects.toThrow(/once/);
    expect((await knex('assessments').where({ id: assessment.assessmentId }).first('status')).status).toBe(
      'signed',
    );
  });

  it('starts a correction as a new draft revision; the signed one becomes superseded and stays as it was', async () => {
    const res = await auditor.json('POST', `/api/assessments/${assessment.assessmentId}/revise`, {});
    expect(res.status, await res.clone().text()).toBe(201);
    const revision = await res.json();
    const rows = await testDb()('assessments')
      .whereIn('id', [assessment.assessmentId, revision.id])
      .select('id', 'status', 'supersedes_id', 'answers', 'result');
    const old = rows.find((r) => r.id === assessment.assessmentId);
    const fresh = rows.find((r) => r.id === revision.id);
    expect(old.status).toBe('superseded');
    expect(old.result).toEqual(assessment.result);
    expect(fresh.status).toBe('draft');
    expect(fresh.supersedes_id).toBe(assessment.assessmentId);
    expect(fresh.answers).toEqual({ signsPosted: { value: 'no' } });
    expect(
      await testDb()('assessment_photos').where({ assessment_id: revision.id }).count({ n: '*' }),
    ).toEqual([{ n: '2' }]);
    await expect(
      testDb().raw(`update assessments set status = 'signed' where id = ?`, [assessment.assessmentId]),
    ).rejects.toThrow(/read-only/);
    expect(
      (await auditor.json('POST', `/api/assessments/${assessment.assessmentId}/revise`, {})).status,
    ).toBe(409);
    // The archived document still serves for the superseded assessment.
    const pdf = await office.fetch(`/api/assessments/${assessment.assessmentId}/report.pdf`);
    expect(pdf.headers.get('x-document-sha256')).toBe(signedDocument.sha256);
  });
});

describe('signing links that cannot be used', () => {
  it('refuses a forged or malformed token with a clear page', async () => {
    for (const token of ['A'.repeat(43), 'not-a-token', `${'b'.repeat(42)}!`]) {
      const page = await anonymousClient().fetch(`/sign/${encodeURIComponent(token)}`);
      expect(page.status).toBe(404);
      expect(await page.text()).toContain('This link cannot be used');
      const res = await submit(encodeURIComponent(token), {
        name: 'Forger',
        consent: true,
        intent: true,
        acknowledgedCautions: [],
        shownPdfSha256: 'a'.repeat(64),
        signature: { method: 'typed' },
      });
      expect(res.status).toBe(404);
    }
  });

  it('refuses an expired link and a link replaced by a newer one; nothing changes', async () => {
    const assessment = await seeded(0);
    const first = await sendAndOpen(assessment.assessmentId);
    const second = await sendAndOpen(assessment.assessmentId, auditor);
    expect(second.token).not.toBe(first.token);
    const replaced = await anonymousClient().fetch(`/sign/${first.token}`);
    expect(replaced.status).toBe(410);
    expect(await replaced.text()).toContain('replaced by a newer one');

    // Make the live link expired: revoke it and open one whose expiry has passed (tests may set up data).
    const knex = testDb();
    const live = await knex('sign_requests')
      .where({ assessment_id: assessment.assessmentId })
      .whereNull('revoked_at')
      .first('*');
    await knex('sign_requests').where({ id: live.id }).update({ revoked_at: knex.fn.now() });
    const expiredToken = 'E'.repeat(43);
    await knex('sign_requests').insert({
      organisation_id: org.id,
      assessment_id: assessment.assessmentId,
      token_hash: createHash('sha256').update(expiredToken).digest('hex'),
      recipient_email: live.recipient_email,
      recipient_name: live.recipient_name,
      document_id: live.document_id,
      expires_at: knex.raw(`now() - interval '1 minute'`),
      created_by: org.office.id,
    });
    const page = await anonymousClient().fetch(`/sign/${expiredToken}`);
    expect(page.status).toBe(410);
    expect(await page.text()).toContain('has expired');
    const shown = (await knex('documents').where({ id: live.document_id }).first('sha256')).sha256;
    const res = await submit(expiredToken, {
      name: 'Late Signer',
      consent: true,
      intent: true,
      acknowledgedCautions: [],
      shownPdfSha256: shown,
      signature: { method: 'typed' },
    });
    expect(res.status).toBe(410);
    expect((await res.json()).linkState).toBe('expired');
    expect((await knex('assessments').where({ id: assessment.assessmentId }).first('status')).status).toBe(
      'awaiting_signature',
    );
    expect(
      await knex('signatures').where({ assessment_id: assessment.assessmentId }).first(),
    ).toBeUndefined();
  });

  it('signs once when the same signature is submitted twice at the same moment', async () => {
    const assessment = await seeded(0);
    const { token } = await sendAndOpen(assessment.assessmentId);
    const html = await (await anonymousClient().fetch(`/sign/${token}`)).text();
    const shown = /data-document-sha256>([0-9a-f]{64})</.exec(html)![1];
    const body = {
      name: 'Double Tapper',
      consent: true,
      intent: true,
      acknowledgedCautions: assessment.result.findings
        .filter((f) => f.outcome === 'fail')
        .map((f) => f.ruleId),
      shownPdfSha256: shown,
      signature: { method: 'typed' },
    };
    const results = await Promise.all([submit(token, body), submit(token, body)]);
    expect(results.map((r) => r.status).sort()).toEqual([201, 409]);
    expect(
      await testDb()('signatures').where({ assessment_id: assessment.assessmentId }).count({ n: '*' }),
    ).toEqual([{ n: '1' }]);
    expect(
      await testDb()('documents')
        .where({ assessment_id: assessment.assessmentId, kind: 'signed_report' })
        .count({ n: '*' }),
    ).toEqual([{ n: '1' }]);
  });
});

describe('who may see the report and send it', () => {
  it('lets staff read the preview and the homeowner read it once sent; others get 401/403/404', async () => {
    // The homeowner signs in by e-mailed link to the client's address: let earlier tests' mail
    // to that address go out first, so the sign-in helper picks the right message.
    await outboxDrained();
    const assessment = await seeded(0);
    const preview = await office.fetch(`/api/assessments/${assessment.assessmentId}/report.pdf`);
    expect(preview.status).toBe(200);
    expect(await extractPdfText(new Uint8Array(await preview.arrayBuffer()))).toContain(
      'Preview - not for signature',
    );
    expect(
      (await anonymousClient().fetch(`/api/assessments/${assessment.assessmentId}/report.pdf`)).status,
    ).toBe(401);
    const homeowner = await signInHomeowner(org.homeowner.email);
    expect((await homeowner.fetch(`/api/assessments/${assessment.assessmentId}/report.pdf`)).status).toBe(
      404,
    );
    expect(
      (await homeowner.json('POST', `/api/assessments/${assessment.assessmentId}/send-for-signature`, {}))
        .status,
    ).toBe(403);
    const other = await createOrganisation('signing-other');
    const stranger = await signIn(other.office.email, fixturePassword);
    expect((await stranger.fetch(`/api/assessments/${assessment.assessmentId}/report.pdf`)).status).toBe(404);
    expect(
      (await stranger.json('POST', `/api/assessments/${assessment.assessmentId}/send-for-signature`, {}))
        .status,
    ).toBe(404);
    const auditor2 = await signIn(org.auditor2.email, fixturePassword);
    expect(
      (await auditor2.json('POST', `/api/assessments/${assessment.assessmentId}/send-for-signature`, {}))
        .status,
    ).toBe(403);
    await sendAndOpen(assessment.assessmentId);
    const sent = await homeowner.fetch(`/api/assessments/${assessment.assessmentId}/report.pdf`);
    expect(sent.status).toBe(200);
    expect(await extractPdfText(new Uint8Array(await sent.arrayBuffer()))).toContain('Copy for signature');
  });

  it('refuses to send an assessment that is not scored, or with an unknown field', async () => {
    const assessment = await seeded(0);
    const bad = await office.json('POST', `/api/assessments/${assessment.assessmentId}/send-for-signature`, {
      expiresInDays: 0,
      colour: 'red',
    });
    expect(bad.status).toBe(422);
    // A submitted assessment never goes back to draft (the database refuses it): a new draft of the same gate.
    const [unsent] = await testDb()('assessments')
      .insert({
        organisation_id: org.id,
        gate_id: assessment.gateId,
        ruleset_version_id: assessment.rulesetVersionId,
        auditor_id: org.auditor.id,
      })
      .returning('id');
    const draft = await office.json('POST', `/api/assessments/${unsent.id}/send-for-signature`, {});
    expect(draft.status).toBe(409);
    expect(draft.headers.get('content-type')).toBe('application/problem+json');
  });
});
