/**
 * Whose address the server believes. A second server instance runs without TRUST_PROXY, as a
 * server with no proxy in front of it must: X-Forwarded-For is ignored and the socket address
 * counts, so rotating or garbling the header neither resets nor switches off per-address
 * throttling, and a forged value never reaches the signature record or the signed PDF. Each
 * test connects from a loopback address of its own (127.x.y.z), which is then the socket
 * address the server must use. The suite's own server runs with TRUST_PROXY=1: there the
 * right-most X-Forwarded-For entry (the one the single proxy appended) counts.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { freePort, startAppServer, type RunningServer } from '../../src/cli/services';
import { extractPdfText } from '../support/pdf-text';
import {
  caughtMailIds,
  createOrganisation,
  fixturePassword,
  linkIn,
  signIn,
  testAddress,
  testDb,
  waitForMail,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { cookiesOf, loopbackAddress, rawRequest } from './support/raw-http';
import { seedScoredAssessment } from './support/signing-seed';

let untrusted: RunningServer;
let org: FixtureOrganisation;
let office: TestClient;

beforeAll(async () => {
  const { TRUST_PROXY: _trusted, ...env } = inject('serverEnv');
  const port = await freePort();
  untrusted = await startAppServer({
    port,
    quiet: true,
    env: { ...env, PUBLIC_URL: `http://127.0.0.1:${port}`, OUTBOX_WORKER: 'off' },
  });
  org = await createOrganisation('client address');
  office = await signIn(org.office.email, fixturePassword);
}, 90_000);

afterAll(async () => {
  await untrusted?.stop();
});

/** A caller on its own loopback address, with auth core's CSRF cookie and token. */
async function caller(base: string, localAddress = loopbackAddress()) {
  const csrf = await rawRequest(new URL('/api/auth/csrf', base), { localAddress });
  const { csrfToken } = csrf.json() as { csrfToken: string };
  const cookie = cookiesOf(csrf).join('; ');
  return {
    localAddress,
    /** A password sign-in (wrong password) for `email`, claiming to come from `forwardedFor`. */
    signIn(email: string, forwardedFor: string | null) {
      return rawRequest(new URL('/api/auth/callback/credentials', base), {
        method: 'POST',
        localAddress,
        headers: {
          origin: base,
          cookie,
          accept: 'application/json',
          'content-type': 'application/x-www-form-urlencoded',
          ...(forwardedFor === null ? {} : { 'x-forwarded-for': forwardedFor }),
        },
        body: new URLSearchParams({
          email,
          password: 'not-the-password',
          csrfToken,
          callbackUrl: '/',
        }).toString(),
      });
    },
  };
}

const unknownEmail = () => `nobody.${Math.random().toString(36).slice(2)}@client-address.test`;

/** The addresses recorded for these e-mails' sign-in attempts. */
async function recordedAddresses(emails: string[]): Promise<string[]> {
  const rows = await testDb()('sign_in_attempts')
    .whereIn('email', emails)
    .select(testDb().raw('host(ip) as ip'));
  return [...new Set(rows.map((r: { ip: string | null }) => r.ip ?? 'null'))];
}

describe('without TRUST_PROXY the socket address counts, whatever X-Forwarded-For says', () => {
  // sign-in throttling: 20 failed password sign-ins per address in 15 minutes (throttle.ts).
  const perAddress = 20;

  it('rotating X-Forwarded-For does not reset the per-address throttle', async () => {
    const c = await caller(untrusted.url);
    const emails: string[] = [];
    for (let i = 0; i < perAddress; i++) {
      const email = unknownEmail();
      emails.push(email);
      const res = await c.signIn(email, testAddress());
      expect(res.status, `attempt ${i + 1}`).toBe(401);
    }
    const refused = await c.signIn(unknownEmail(), testAddress());
    expect(refused.status).toBe(429);
    expect(refused.headers['content-type']).toBe('application/problem+json');
    expect(Number(refused.headers['retry-after'])).toBeGreaterThan(0);
    expect(await recordedAddresses(emails)).toEqual([c.localAddress]);
  });

  it('an X-Forwarded-For that is not an address does not switch per-address throttling off', async () => {
    const c = await caller(untrusted.url);
    const emails: string[] = [];
    const garbage = ['unknown', '<script>', '999.1.1.1', '', 'not an address, 198.18.0.1 extra'];
    for (let i = 0; i < perAddress; i++) {
      const email = unknownEmail();
      emails.push(email);
      expect((await c.signIn(email, garbage[i % garbage.length])).status, `attempt ${i + 1}`).toBe(401);
    }
    expect((await c.signIn(unknownEmail(), 'unknown')).status).toBe(429);
    expect(await recordedAddresses(emails)).toEqual([c.localAddress]);
  });

  it('the signature record and the signed PDF carry the socket address, not a forged X-Forwarded-For', async () => {
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
    const mail = await waitForMail(clientEmail, seen, 20_000);
    const token = /\/sign\/([A-Za-z0-9_-]{43})/.exec(linkIn(mail.text, '/sign/'))![1];

    const localAddress = loopbackAddress();
    const page = await rawRequest(new URL(`/sign/${token}`, untrusted.url), { localAddress });
    const shownSha = /data-document-sha256>([0-9a-f]{64})</.exec(page.text())?.[1];
    expect(shownSha).toMatch(/^[0-9a-f]{64}$/);
    const forged = '203.0.113.99';
    const res = await rawRequest(new URL(`/api/sign/${token}/submit`, untrusted.url), {
      method: 'POST',
      localAddress,
      headers: {
        origin: untrusted.url,
        'content-type': 'application/json',
        accept: 'application/json',
        'x-forwarded-for': forged,
      },
      body: JSON.stringify({
        name: 'Imke Quillfeather',
        consent: true,
        intent: true,
        acknowledgedCautions: seeded.result.findings.filter((f) => f.outcome === 'fail').map((f) => f.ruleId),
        shownPdfSha256: shownSha,
        signature: { method: 'typed' },
      }),
    });
    expect(res.status, res.text()).toBe(201);
    const signature = await testDb()('signatures')
      .where({ assessment_id: seeded.assessmentId })
      .first(testDb().raw('host(ip) as ip'));
    expect(signature.ip).toBe(localAddress);

    const pdf = await office.fetch(`/api/documents/${res.json().document.id}/file`);
    expect(pdf.status).toBe(200);
    const text = await extractPdfText(new Uint8Array(await pdf.arrayBuffer()));
    expect(text).toContain(localAddress);
    expect(text).not.toContain(forged);
  }, 120_000);
});

describe('with TRUST_PROXY=1 (the suite server) the right-most X-Forwarded-For entry counts', () => {
  it('records the address the proxy appended, not the one the client claimed', async () => {
    const c = await caller(inject('baseUrl'));
    const claimed = '203.0.113.5';
    const appended = testAddress();
    const email = unknownEmail();
    expect((await c.signIn(email, `${claimed}, ${appended}`)).status).toBe(401);
    expect(await recordedAddresses([email])).toEqual([appended]);
  });

  it('falls back to the socket address when that entry is not an address, and normalises IPv4-mapped IPv6', async () => {
    const c = await caller(inject('baseUrl'));
    const garbled = unknownEmail();
    expect((await c.signIn(garbled, '198.18.0.1, not-an-address')).status).toBe(401);
    expect(await recordedAddresses([garbled])).toEqual([c.localAddress]);
    const mapped = unknownEmail();
    const address = testAddress();
    expect((await c.signIn(mapped, `::ffff:${address}`)).status).toBe(401);
    expect(await recordedAddresses([mapped])).toEqual([address]);
  });
});
