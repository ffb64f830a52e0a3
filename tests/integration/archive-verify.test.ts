/**
 * Public verification of a signed report, without signing in: by the PDF itself (multipart or
 * raw) or by its document id; the answer is genuine-or-not, when it was signed and by whom —
 * nothing about the client, the gate or the findings.
 */
import { createHash } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { createPrng, sampleGate } from '../support/archive-samples';
import {
  anonymousClient,
  createOrganisation,
  fixturePassword,
  saveOrganisationSettings,
  signIn,
  testDb,
  type FixtureOrganisation,
} from './support/fixtures';
import {
  addClient,
  addGate,
  addSite,
  expectJson,
  fileAssessment,
  publishedVersion,
  type FiledAssessment,
} from './support/archive';

let org: FixtureOrganisation;
let signed: FiledAssessment;
let draftCopyId: string;

beforeAll(async () => {
  org = await createOrganisation('verify');
  const version = await publishedVersion('north-american-gate', '2026.1');
  const prng = createPrng(77);
  const gate = sampleGate(prng);
  const client = await addClient(org.id, 'Larkspur Row Residents');
  const site = await addSite(org.id, client, '5 Larkspur Row', 'Northwick', 2);
  const gateId = await addGate(org.id, site, 'Residents gate', gate);
  signed = await fileAssessment({
    organisationId: org.id,
    gateId,
    auditorId: org.auditor.id,
    version,
    gate,
    usageClass: 2,
    visitedOn: '2026-10-02T10:00:00Z',
    prng,
  });
  // A signing copy is not a signed report, even though it is stored and hashed.
  const copy = Buffer.from(`%PDF-1.7\n% signing copy ${signed.id}\n%%EOF\n`);
  const [row] = await testDb()('documents')
    .insert({
      organisation_id: org.id,
      assessment_id: signed.id,
      kind: 'signing_copy',
      sha256: sha(copy),
      storage_key: sha(copy),
      size_bytes: copy.byteLength,
      filename: 'copy.pdf',
    })
    .returning('id');
  draftCopyId = row.id;
});

function sha(bytes: Buffer): string {
  return createHash('sha256').update(bytes).digest('hex');
}

function pdfForm(bytes: Buffer): FormData {
  const form = new FormData();
  form.set('file', new Blob([new Uint8Array(bytes)], { type: 'application/pdf' }), 'report.pdf');
  return form;
}

describe('public verification', () => {
  it('confirms an uploaded signed PDF with when it was signed and by which organisation, and nothing else', async () => {
    const answer = await expectJson<Record<string, unknown>>(
      await anonymousClient().fetch('/api/verify', { method: 'POST', body: pdfForm(signed.pdf!) }),
    );
    expect(answer).toEqual({
      match: true,
      documentId: signed.documentId,
      signedAt: '2026-10-02T11:00:00.000Z',
      organisation: org.name,
    });
  });

  it('confirms by document id, and by the raw PDF body', async () => {
    expect(
      await expectJson(await anonymousClient().fetch(`/api/verify?document=${signed.documentId}`)),
    ).toMatchObject({ match: true, organisation: org.name });
    const raw = await anonymousClient().fetch('/api/verify', {
      method: 'POST',
      headers: { 'content-type': 'application/pdf' },
      body: new Uint8Array(signed.pdf!),
    });
    expect(await expectJson(raw)).toMatchObject({ match: true, documentId: signed.documentId });
  });

  it('says no match for a PDF changed by one byte, a signing copy or an unknown id', async () => {
    const changed = Buffer.from(signed.pdf!);
    changed[changed.length - 2] ^= 1;
    expect(
      await expectJson(
        await anonymousClient().fetch('/api/verify', { method: 'POST', body: pdfForm(changed) }),
      ),
    ).toEqual({ match: false });
    expect(await expectJson(await anonymousClient().fetch(`/api/verify?document=${draftCopyId}`))).toEqual({
      match: false,
    });
    expect(
      await expectJson(
        await anonymousClient().fetch('/api/verify?document=00000000-0000-4000-8000-000000000000'),
      ),
    ).toEqual({ match: false });
    const bad = await anonymousClient().fetch('/api/verify?document=not-an-id');
    expect(bad.status).toBe(400);
    expect((await bad.json()).errors[0].field).toBe('document');
  });

  it('answers the verification page without sign-in, without script', async () => {
    const page = await anonymousClient().fetch('/verify');
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('Verify a signed report');
    const posted = await anonymousClient().fetch('/verify', { method: 'POST', body: pdfForm(signed.pdf!) });
    const html = await posted.text();
    expect(posted.status).toBe(200);
    expect(html).toContain('Genuine');
    expect(html).toContain(org.name);
    expect(html).not.toContain('Larkspur');
    const byId = new FormData();
    byId.set('document', draftCopyId);
    expect(await (await anonymousClient().fetch('/verify', { method: 'POST', body: byId })).text()).toContain(
      'No match',
    );
  });

  it("shows when it was signed in the signing organisation's zone to a visitor without one, and names the zone", async () => {
    await testDb()('organisations').where({ id: org.id }).update({ time_zone: 'America/Denver' });
    try {
      const byId = new FormData();
      byId.set('document', signed.documentId!);
      const html = await (await anonymousClient().fetch('/verify', { method: 'POST', body: byId })).text();
      // Signed 2026-10-02 11:00 UTC: 05:00 in Denver (MDT, UTC-6).
      expect(html).toContain('Oct 2, 2026, 5:00 AM MDT');
      expect(html).toContain('(time zone America/Denver)');
      expect(html).not.toContain('(UTC)');
    } finally {
      await testDb()('organisations').where({ id: org.id }).update({ time_zone: 'UTC' });
    }
  });

  it("shows it in the visitor's own organisation's zone when they are signed in", async () => {
    const visitorOrg = await createOrganisation('verify-visitor');
    const visitor = await signIn(visitorOrg.owner.email, fixturePassword);
    await saveOrganisationSettings(visitor, visitorOrg.id, { timeZone: 'Asia/Tokyo' });
    const byId = new FormData();
    byId.set('document', signed.documentId!);
    const html = await (await visitor.fetch('/verify', { method: 'POST', body: byId })).text();
    expect(html).toContain('Genuine');
    // 11:00 UTC is 20:00 in Tokyo (UTC+9, no daylight saving).
    expect(html).toContain('Oct 2, 2026, 8:00 PM GMT+9');
    expect(html).toContain('(time zone Asia/Tokyo)');
  });

  it('throttles one address after 60 checks in 15 minutes, API and page alike, and leaves other addresses alone', async () => {
    // Common practice, no source: a sliding-window limit per client address
    const visitor = anonymousClient();
    for (let i = 0; i < 60; i++) {
      const answer = await visitor.fetch(`/api/verify?document=${signed.documentId}`);
      expect(answer.status, `check ${i + 1}`).toBe(200);
      await answer.arrayBuffer();
    }
    const refused = await visitor.fetch('/api/verify', { method: 'POST', body: pdfForm(signed.pdf!) });
    expect(refused.status).toBe(429);
    expect(refused.headers.get('content-type')).toContain('application/problem+json');
    const retryAfter = Number(refused.headers.get('retry-after'));
    expect(retryAfter).toBeGreaterThan(0);
    expect(retryAfter).toBeLessThanOrEqual(15 * 60);
    expect((await refused.json()).detail).toMatch(
      /^Too many reports checked from this address\. Try again in about \d+ minutes?\.$/,
    );
    const page = await visitor.fetch('/verify', { method: 'POST', body: pdfForm(signed.pdf!) });
    expect(page.status).toBe(429);
    expect(await page.text()).toContain('Too many reports checked from this address');
    // Another address is not affected, and the refused checks did not count.
    expect(
      await expectJson(await anonymousClient().fetch(`/api/verify?document=${signed.documentId}`)),
    ).toMatchObject({ match: true });
    const counted = await testDb()('sign_in_attempts')
      .where({ kind: 'verify', ip: visitor.address })
      .count<{ count: string }[]>('* as count');
    expect(Number(counted[0]!.count)).toBe(60);
  });
});
