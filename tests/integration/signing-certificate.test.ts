/**
 * The organisation's own signing certificate, over HTTP: the owner uploads a PKCS#12 made here
 * (a leaf issued by a test authority), bad uploads get 422 naming the field and change nothing,
 * only the owner may upload, the upload is audited and its passphrase is not stored; a report
 * signed afterwards carries that certificate (read from the PDF's CMS), names it in its record,
 * and /verify shows its fingerprint. Removing the upload goes back to the self-made one.
 */
import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { extractPdfText } from '../support/pdf-text';
import {
  anonymousClient,
  caughtMailIds,
  createOrganisation,
  fixturePassword,
  linkIn,
  signIn,
  testDb,
  waitForMail,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { makePkcs12, pdfSignerSha256, type TestPkcs12 } from './support/pkcs12';
import { seedScoredAssessment } from './support/signing-seed';

let org: FixtureOrganisation;
let owner: TestClient;
let office: TestClient;
let good: TestPkcs12;
let expired: TestPkcs12;
let notYetValid: TestPkcs12;
let encipherOnly: TestPkcs12;

const colons = (sha256: string) => (sha256.toUpperCase().match(/../g) ?? []).join(':');

function certificateForm(p12: Buffer | string, passphrase?: string): FormData {
  const form = new FormData();
  form.set(
    'certificate',
    new Blob([typeof p12 === 'string' ? p12 : new Uint8Array(p12)], { type: 'application/x-pkcs12' }),
    'signing.p12',
  );
  if (passphrase !== undefined) form.set('passphrase', passphrase);
  return form;
}

const upload = (client: TestClient, form: FormData) =>
  client.fetch('/api/organisation/certificate', {
    method: 'PUT',
    headers: { accept: 'application/json' },
    body: form,
  });

async function storedState() {
  const rows = await testDb()('organisation_signing_certificates')
    .where({ organisation_id: org.id })
    .select('sha256');
  const audits = await testDb()('audit_events')
    .where({ organisation_id: org.id })
    .where('action', 'like', 'organisation.signing_certificate%')
    .count({ n: '*' });
  return { rows: rows.map((r) => r.sha256), audits: Number(audits[0]!.n) };
}

/** Sends a seeded assessment for signature, signs it as the homeowner over HTTP, and returns the signed document. */
async function signOneReport(): Promise<{ id: string; sha256: string }> {
  const seeded = await seedScoredAssessment(
    testDb(),
    { id: org.id, auditorId: org.auditor.id, clientId: org.clientId },
    { dataDir: inject('dataDir'), photos: 0 },
  );
  const clientEmail = (await testDb()('clients').where({ id: org.clientId }).first('contact_email'))
    .contact_email as string;
  const seen = await caughtMailIds(clientEmail);
  const sent = await office.json('POST', `/api/assessments/${seeded.assessmentId}/send-for-signature`, {});
  expect(sent.status, await sent.clone().text()).toBe(202);
  const mail = await waitForMail(clientEmail, seen, 15_000);
  const token = new URL(linkIn(mail.text, '/sign/')).pathname.split('/').pop()!;
  const page = await (await anonymousClient().fetch(`/sign/${token}`)).text();
  const shownPdfSha256 = /data-document-sha256>([0-9a-f]{64})</.exec(page)?.[1];
  const res = await anonymousClient().json('POST', `/api/sign/${token}/submit`, {
    name: 'Oriel Fenwick',
    consent: true,
    intent: true,
    acknowledgedCautions: seeded.result.findings.filter((f) => f.outcome === 'fail').map((f) => f.ruleId),
    shownPdfSha256,
    signature: { method: 'typed' },
  });
  expect(res.status, await res.clone().text()).toBe(201);
  return (await res.json()).document;
}

beforeAll(async () => {
  [good, expired, notYetValid, encipherOnly] = await Promise.all([
    makePkcs12({ issued: true, commonName: 'Brackenfold Gates document signing' }),
    makePkcs12({ validFromDays: -400, validToDays: -1, passphrase: 'p' }),
    makePkcs12({ validFromDays: 2, validToDays: 300, passphrase: 'p' }),
    makePkcs12({ keyUsage: { keyEncipherment: true }, passphrase: 'p' }),
  ]);
  org = await createOrganisation('certificate');
  [owner, office] = await Promise.all([
    signIn(org.owner.email, fixturePassword),
    signIn(org.office.email, fixturePassword),
  ]);
}, 60_000);

describe("the organisation's signing certificate", () => {
  it('refuses bad uploads with 422 naming the field, and stores and audits nothing', async () => {
    const before = await storedState();
    const cases: Array<[string, FormData, string, RegExp]> = [
      ['wrong passphrase', certificateForm(good.p12, 'not-the-passphrase'), 'passphrase', /does not open/],
      ['no passphrase', certificateForm(good.p12, ''), 'passphrase', /passphrase/],
      [
        'not PKCS#12',
        certificateForm('%PDF-1.7\nnot a certificate\n%%EOF\n', 'x'),
        'certificate',
        /not a PKCS#12/,
      ],
      ['expired', certificateForm(expired.p12, 'p'), 'certificate', /expired on/],
      ['not yet valid', certificateForm(notYetValid.p12, 'p'), 'certificate', /not valid before/],
      ['key usage without signing', certificateForm(encipherOnly.p12, 'p'), 'certificate', /key usage/],
      ['too large', certificateForm(Buffer.alloc(64 * 1024 + 1, 0x30), 'x'), 'certificate', /at most 64 KB/],
    ];
    for (const [name, form, field, message] of cases) {
      const res = await upload(owner, form);
      expect(res.status, name).toBe(422);
      expect(res.headers.get('content-type'), name).toContain('application/problem+json');
      const body = await res.json();
      expect(body.errors, name).toEqual([{ field, message: expect.stringMatching(message) }]);
    }
    // The settings page's form says the same beside the field.
    const page = await owner.fetch('/settings?certificate=upload', {
      method: 'POST',
      body: certificateForm(good.p12, 'not-the-passphrase'),
    });
    expect(page.status).toBe(422);
    expect(await page.text()).toContain('The passphrase does not open this certificate file.');
    expect(await storedState()).toEqual(before);
  });

  it('lets only the owner upload', async () => {
    const before = await storedState();
    expect((await upload(office, certificateForm(good.p12, good.passphrase))).status).toBe(403);
    expect((await upload(anonymousClient(), certificateForm(good.p12, good.passphrase))).status).toBe(401);
    expect(await storedState()).toEqual(before);
  });

  it('stores a good upload without its passphrase, audits it, and shows its fingerprint and validity', async () => {
    const res = await upload(owner, certificateForm(good.p12, good.passphrase));
    expect(res.status, await res.clone().text()).toBe(200);
    const body = await res.json();
    expect(body.inUse).toMatchObject({
      source: 'uploaded',
      sha256: good.sha256,
      selfSigned: false,
      subject: expect.stringContaining(good.commonName),
    });
    expect(body.inUse.issuer).toContain('Test Issuing Authority');
    expect(Date.parse(body.inUse.notAfter)).toBeGreaterThan(Date.now());

    const row = await testDb()('organisation_signing_certificates')
      .where({ organisation_id: org.id })
      .first();
    expect(row.sha256).toBe(good.sha256);
    const stored = JSON.stringify({ ...row, p12: Buffer.from(row.p12).toString('latin1') });
    expect(stored).not.toContain(good.passphrase);
    expect(row.passphrase_sealed).toMatch(/^v1\./);
    const audit = await testDb()('audit_events')
      .where({ organisation_id: org.id, action: 'organisation.signing_certificate_uploaded' })
      .first('detail', 'actor_user_id');
    expect(audit.detail.sha256).toBe(good.sha256);
    expect(audit.actor_user_id).toBe(org.owner.id);

    const readBack = await (await office.fetch('/api/organisation/certificate')).json();
    expect(readBack.inUse.sha256).toBe(good.sha256);
    const settings = await (await owner.fetch('/settings')).text();
    expect(settings).toContain(colons(good.sha256));
  });

  it(
    'signs the next report with it: the PDF signature carries that certificate, the record names it, /verify shows its fingerprint',
    { timeout: 60_000 },
    async () => {
      const document = await signOneReport();
      const pdf = Buffer.from(await (await office.fetch(`/api/documents/${document.id}/file`)).arrayBuffer());
      // Every HTTP call first: reading the PDF below is CPU-heavy, and a test that blocks its event
      // loop can miss the server closing an idle keep-alive socket.
      const answer = await (await anonymousClient().fetch(`/api/verify?document=${document.id}`)).json();
      expect(answer).toMatchObject({ match: true, certificate: { sha256: good.sha256, selfSigned: false } });
      const form = new FormData();
      form.set('file', new Blob([new Uint8Array(pdf)], { type: 'application/pdf' }), 'report.pdf');
      const page = await (await anonymousClient().fetch('/verify', { method: 'POST', body: form })).text();
      expect(page).toContain(colons(good.sha256));
      expect(page).toContain('Why does my PDF reader say the signer or issuer is unknown?');

      expect(pdfSignerSha256(pdf)).toBe(good.sha256);

      const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-cert-'));
      try {
        fs.writeFileSync(path.join(dir, 'signed.pdf'), pdf);
        // Not execFileSync: a blocked event loop misses the server closing an idle keep-alive socket.
        const { stdout: report } = await promisify(execFile)('pdfsig', [path.join(dir, 'signed.pdf')], {
          encoding: 'utf8',
        });
        expect(report).toContain('Signature is Valid');
        expect(report).toContain(good.commonName);
      } finally {
        fs.rmSync(dir, { recursive: true, force: true });
      }
      const text = (await extractPdfText(pdf)).replace(/\s+/g, '');
      expect(text).toContain(colons(good.sha256));
      expect(text).toContain('TestIssuingAuthority');
    },
  );

  it(
    'goes back to the self-made certificate when the owner removes the upload, and says so on the next report',
    { timeout: 60_000 },
    async () => {
      expect((await office.fetch('/api/organisation/certificate', { method: 'DELETE' })).status).toBe(403);
      expect((await owner.fetch('/api/organisation/certificate', { method: 'DELETE' })).status).toBe(204);
      const removed = await testDb()('audit_events')
        .where({ organisation_id: org.id, action: 'organisation.signing_certificate_removed' })
        .first('detail');
      expect(removed.detail.sha256).toBe(good.sha256);
      const overview = await (await owner.fetch('/api/organisation/certificate')).json();
      expect(overview.inUse).toMatchObject({ source: 'generated', selfSigned: true });

      const document = await signOneReport();
      const pdf = Buffer.from(await (await office.fetch(`/api/documents/${document.id}/file`)).arrayBuffer());
      const answer = await (await anonymousClient().fetch(`/api/verify?document=${document.id}`)).json();
      expect(answer.certificate).toMatchObject({ sha256: overview.inUse.sha256, selfSigned: true });
      expect(pdfSignerSha256(pdf)).toBe(overview.inUse.sha256);
      const text = (await extractPdfText(pdf)).replace(/\s+/g, ' ');
      expect(text).toContain('not issued by a public certificate authority');
      expect(text).toContain('unknown or not trusted');
      expect(text.replace(/\s+/g, '')).toContain(colons(overview.inUse.sha256));
    },
  );
});
