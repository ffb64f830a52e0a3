/**
 * Links in e-mails: every one (sign-in, invitation, signing, re-inspection reminder) is built
 * from the configured public origin, or from the server's own listening address when none is
 * configured, never from the Host, X-Forwarded-Host or X-Forwarded-Proto the request claims.
 * And every mail goes through the outbox: with SMTP unreachable an invitation is still 201 and
 * a sign-in link is still sent, both delivered once SMTP answers again.
 *
 * A second server instance runs on the suite's database with no PUBLIC_URL / AUTH_URL, its own
 * outbox channel (so only its own worker delivers its mail) and an SMTP port where this file
 * starts a mail catcher only after the "SMTP down" cases.
 */
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { freePort, startAppServer, type RunningServer } from '../../src/cli/services';
import { startMailCatcher, type RunningCatcher } from '../../src/lib/server/mail/catcher';
import { insertGate, insertSite } from './support/domain';
import {
  createOrganisation,
  fixturePassword,
  followHomeownerLink,
  hasSession,
  signIn,
  testAddress,
  testDb,
  type FixtureOrganisation,
} from './support/fixtures';
import { rawRequest, type RawResponse } from './support/raw-http';
import { seedScoredAssessment } from './support/signing-seed';
import { extractPdfText } from '../support/pdf-text';

let bare: RunningServer;
let smtpPort: number;
let httpPort: number;
let catcher: RunningCatcher | undefined;
let mailDir: string;
let org: FixtureOrganisation;
let channel: string;

const forgeries: Array<{ name: string; headers: Record<string, string> }> = [
  { name: 'Host', headers: { host: 'attacker.example' } },
  { name: 'X-Forwarded-Host', headers: { 'x-forwarded-host': 'attacker.example' } },
  {
    name: 'X-Forwarded-Proto and Host',
    headers: {
      'x-forwarded-proto': 'https',
      'x-forwarded-host': 'attacker.example:8443',
      host: 'attacker.example',
    },
  },
];

beforeAll(async () => {
  org = await createOrganisation('mail-links');
  mailDir = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-links-mail-'));
  [smtpPort, httpPort] = await Promise.all([freePort(), freePort()]);
  channel = `links-${randomBytes(3).toString('hex')}`;
  const { PUBLIC_URL: _public, AUTH_URL: _auth, ...serverEnv } = inject('serverEnv');
  bare = await startAppServer({
    port: await freePort(),
    quiet: true,
    env: {
      ...serverEnv,
      // Nothing listens here until the SMTP-down cases are over.
      SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
      MAIL_CATCHER_URL: `http://127.0.0.1:${httpPort}`,
      OUTBOX_CHANNEL: channel,
      OUTBOX_POLL_MS: '200',
      OUTBOX_RETRY_BASE_MS: '300',
      OUTBOX_RETRY_MAX_MS: '1000',
      // The parent's environment must not lend the second server a public origin either.
      PUBLIC_URL: '',
      AUTH_URL: '',
    },
  });
}, 90_000);

afterAll(async () => {
  await bare?.stop();
  await catcher?.close();
  if (mailDir) fs.rmSync(mailDir, { recursive: true, force: true });
});

/** One HTTP request with exactly the headers given (fetch will not forge Host). */
async function raw(
  base: string,
  pathname: string,
  init: { method?: string; headers?: Record<string, string>; body?: string } = {},
): Promise<{ status: number; headers: RawResponse['headers']; body: string }> {
  const answer = await rawRequest(new URL(pathname, base), {
    method: init.method,
    headers: { 'x-forwarded-for': testAddress(), ...init.headers },
    body: init.body,
  });
  return { status: answer.status, headers: answer.headers, body: answer.text() };
}

function json(
  base: string,
  method: string,
  pathname: string,
  body: unknown,
  headers: Record<string, string> = {},
) {
  return raw(base, pathname, {
    method,
    headers: { 'content-type': 'application/json', accept: 'application/json', ...headers },
    body: JSON.stringify(body),
  });
}

/**
 * A staff session cookie (signed in on the suite's server; sessions are valid on every instance
 * sharing AUTH_SECRET). The forged requests send no Origin: they do not come from a browser.
 */
async function staffCookie(email: string): Promise<string> {
  return (await signIn(email, fixturePassword)).cookie;
}

interface CaughtMail {
  id: string;
  to: string[];
  subject: string;
  text: string;
}

async function caughtAt(catcherUrl: string, to: string): Promise<CaughtMail[]> {
  const list = (await (await fetch(`${catcherUrl}/messages`)).json()) as Array<{ id: string; to: string[] }>;
  const mine = list.filter((m) => m.to.some((t) => t.toLowerCase() === to.toLowerCase()));
  return Promise.all(
    mine.map(async (m) => (await (await fetch(`${catcherUrl}/messages/${m.id}`)).json()) as CaughtMail),
  );
}

async function until<T>(
  what: string,
  probe: () => Promise<T | undefined | false>,
  timeoutMs = 20_000,
): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

/** Waits for exactly one mail to `to` at the catcher and returns every link in it. */
async function onlyMailTo(catcherUrl: string, to: string): Promise<{ mail: CaughtMail; links: URL[] }> {
  const [mail, ...more] = await until(`mail to ${to}`, async () => {
    const found = await caughtAt(catcherUrl, to);
    return found.length ? found : undefined;
  });
  expect(more).toHaveLength(0);
  const links = [...mail.text.matchAll(/https?:\/\/[^\s"'<>]+/g)].map((m) => new URL(m[0]));
  expect(links.length).toBeGreaterThan(0);
  return { mail, links };
}

const newAddress = (label: string) => `${label}-${randomBytes(4).toString('hex')}@fixtures.test`;

/** A scored report, ready to send for signature, of a new homeowner client at `email`. */
async function reportForNewClient(email: string) {
  const [clientRow] = await testDb()('clients')
    .insert({ organisation_id: org.id, name: `Signer ${email}`, kind: 'homeowner', contact_email: email })
    .returning('id');
  return seedScoredAssessment(
    testDb(),
    { id: org.id, auditorId: org.auditor.id, clientId: clientRow.id },
    { dataDir: inject('dataDir'), photos: 0, findings: 2 },
  );
}

describe('mail while SMTP is unreachable', () => {
  let invitee: string;

  it('answers an invitation 201 and keeps its mail queued in the outbox', async () => {
    invitee = newAddress('queued-invitee');
    const cookie = await staffCookie(org.owner.email);
    const res = await json(
      bare.url,
      'POST',
      '/api/invitations',
      { email: invitee, role: 'auditor' },
      { cookie },
    );
    expect(res.status, res.body).toBe(201);
    const row = await until('a retried invitation message', async () => {
      const r = await testDb()('outbox_messages')
        .where({ channel })
        .whereRaw('? = any(to_addresses)', [invitee])
        .first('kind', 'status', 'attempts', 'last_error', 'organisation_id');
      return r && r.attempts >= 1 && r.last_error ? r : undefined;
    });
    expect(row).toMatchObject({ kind: 'invitation', organisation_id: org.id });
    expect(['queued', 'sending']).toContain(row.status);
    expect(
      await testDb()('invitations')
        .whereRaw('email = ?::citext', [invitee])
        .whereNull('revoked_at')
        .count({ n: '*' }),
    ).toEqual([{ n: '1' }]);
  });

  it('queues a homeowner sign-in link instead of losing it', async () => {
    const res = await json(bare.url, 'POST', '/api/auth/email-link', { email: org.homeowner.email });
    expect(res.status, res.body).toBe(202);
    const row = await until('a queued sign-in link message', async () => {
      const r = await testDb()('outbox_messages')
        .where({ channel })
        .whereRaw('? = any(to_addresses)', [org.homeowner.email])
        .first('kind', 'status', 'organisation_id');
      return r ? (r as { kind: string; status: string; organisation_id: string }) : undefined;
    });
    expect(row).toMatchObject({ kind: 'sign_in_link', organisation_id: org.id });
    expect(row.status).not.toBe('sent');
  });

  it('delivers both once SMTP answers, once each, and the links work', async () => {
    catcher = await startMailCatcher({ dir: mailDir, smtpPort, httpPort });
    const catcherUrl = `http://127.0.0.1:${httpPort}`;
    const invitation = await onlyMailTo(catcherUrl, invitee);
    const link = await onlyMailTo(catcherUrl, org.homeowner.email);
    await new Promise((r) => setTimeout(r, 800));
    expect(await caughtAt(catcherUrl, invitee)).toHaveLength(1);
    expect(await caughtAt(catcherUrl, org.homeowner.email)).toHaveLength(1);

    const invite = invitation.links.find((u) => u.pathname.startsWith('/invite/'))!;
    expect(invite.origin).toBe(bare.url);
    const token = invite.pathname.split('/').pop();
    const accepted = await json(bare.url, 'POST', `/api/invitations/${token}/accept`, {
      name: 'Queued Invitee',
      password: 'queued-invitee-pass',
    });
    expect(accepted.status, accepted.body).toBe(201);

    const signInLink = link.links.find((u) => u.pathname === '/signin/link')!;
    expect(signInLink.origin).toBe(bare.url);
    const rows = await testDb()('outbox_messages')
      .where({ channel })
      .select('status', 'text_body', 'html_body');
    expect(rows.map((r) => r.status)).toEqual(['sent', 'sent']);
    // Delivered: the database keeps no usable token (only its hash).
    for (const row of rows) {
      expect(row.text_body).not.toContain(token);
      expect(row.text_body).not.toContain(signInLink.searchParams.get('token'));
      expect(row.html_body).toBeNull();
    }
  });
});

describe('links in e-mails ignore the host a request claims', () => {
  /** The servers and the origin their links must use: the configured one, or the bare server's own address. */
  const servers = () => [
    {
      name: 'with PUBLIC_URL',
      base: inject('baseUrl'),
      catcherUrl: inject('catcherUrl'),
      expected: inject('serverEnv').PUBLIC_URL,
    },
    {
      name: 'without PUBLIC_URL',
      base: bare.url,
      catcherUrl: `http://127.0.0.1:${httpPort}`,
      expected: bare.url,
    },
  ];

  it('in a homeowner sign-in link, whose token signs in on the real server', async () => {
    for (const server of servers()) {
      for (const forged of forgeries) {
        const home = await createOrganisation('forged-link');
        const res = await json(
          server.base,
          'POST',
          '/api/auth/email-link',
          { email: home.homeowner.email },
          forged.headers,
        );
        expect(res.status, `${server.name}, ${forged.name}: ${res.body}`).toBe(202);
        const { links } = await onlyMailTo(server.catcherUrl, home.homeowner.email);
        for (const link of links)
          expect(link.origin, `${server.name}, forged ${forged.name}`).toBe(server.expected);
        const link = links.find((u) => u.pathname === '/signin/link')!;
        // The token works where the link points.
        const followed = await followHomeownerLink(`${inject('baseUrl')}${link.pathname}${link.search}`);
        expect(hasSession(followed.client), `${server.name}, ${forged.name}`).toBe(true);
      }
    }
  });

  it('in a staff password-reset link', async () => {
    for (const server of servers()) {
      for (const forged of forgeries) {
        const staff = await createOrganisation('forged-reset');
        const res = await raw(server.base, '/signin/forgot', {
          method: 'POST',
          headers: { 'content-type': 'application/x-www-form-urlencoded', ...forged.headers },
          body: new URLSearchParams({ email: staff.office.email }).toString(),
        });
        expect(res.status, `${server.name}, ${forged.name}`).toBe(200);
        const { links } = await onlyMailTo(server.catcherUrl, staff.office.email);
        for (const link of links)
          expect(link.origin, `${server.name}, forged ${forged.name}`).toBe(server.expected);
        expect(links.some((u) => u.pathname === '/signin/reset')).toBe(true);
      }
    }
  });

  it('in an invitation', async () => {
    for (const server of servers()) {
      const cookie = await staffCookie(org.owner.email);
      for (const forged of forgeries) {
        const email = newAddress('forged-invitee');
        const res = await json(
          server.base,
          'POST',
          '/api/invitations',
          { email, role: 'office' },
          { cookie, ...forged.headers },
        );
        expect(res.status, `${server.name}, ${forged.name}: ${res.body}`).toBe(201);
        const { links } = await onlyMailTo(server.catcherUrl, email);
        for (const link of links)
          expect(link.origin, `${server.name}, forged ${forged.name}`).toBe(server.expected);
      }
    }
  });

  it('in a request to sign a report', async () => {
    const server = servers()[1]!;
    const cookie = await staffCookie(org.office.email);
    for (const forged of forgeries) {
      const client = newAddress('forged-signer');
      const seeded = await reportForNewClient(client);
      const res = await json(
        server.base,
        'POST',
        `/api/assessments/${seeded.assessmentId}/send-for-signature`,
        {},
        { cookie, ...forged.headers },
      );
      expect(res.status, `${forged.name}: ${res.body}`).toBe(202);
      const { links } = await onlyMailTo(server.catcherUrl, client);
      expect(links.some((u) => u.pathname.startsWith('/sign/'))).toBe(true);
      for (const link of links) expect(link.origin, `forged ${forged.name}`).toBe(server.expected);
    }
  });

  it('in a re-inspection reminder', async () => {
    const server = servers()[1]!;
    for (const forged of forgeries) {
      const due = await createOrganisation('forged-reminder');
      const siteId = await insertSite(due.id, due.clientId);
      await insertGate(due.id, siteId, { next_inspection_due: new Date().toISOString().slice(0, 10) });
      const cookie = await staffCookie(due.office.email);
      const res = await json(
        server.base,
        'POST',
        '/api/archive/reinspection/reminders',
        {},
        { cookie, ...forged.headers },
      );
      expect(res.status, `${forged.name}: ${res.body}`).toBe(202);
      const { links } = await onlyMailTo(server.catcherUrl, due.office.email);
      expect(links.some((u) => u.pathname === '/archive/reinspection')).toBe(true);
      for (const link of links) expect(link.origin, `forged ${forged.name}`).toBe(server.expected);
    }
  });
});

describe('the signed PDF names the Verify page at the public address', () => {
  /** Sends a report for signature on `base`, signs it there with `forged` headers, returns the PDF's text. */
  async function signedPdfText(base: string, catcherUrl: string, forged: Record<string, string>) {
    // The bare server's catcher starts after the SMTP-down cases; when they were skipped, here.
    catcher ??= await startMailCatcher({ dir: mailDir, smtpPort, httpPort });
    const cookie = await staffCookie(org.office.email);
    const email = newAddress('verify-link');
    const seeded = await reportForNewClient(email);
    const sent = await json(
      base,
      'POST',
      `/api/assessments/${seeded.assessmentId}/send-for-signature`,
      {},
      { cookie, ...forged },
    );
    expect(sent.status, sent.body).toBe(202);
    const { links } = await onlyMailTo(catcherUrl, email);
    const token = links.find((u) => u.pathname.startsWith('/sign/'))!.pathname.slice('/sign/'.length);
    const page = await raw(base, `/sign/${token}`, { headers: forged });
    const shownSha = /data-document-sha256>([0-9a-f]{64})</.exec(page.body)?.[1];
    expect(shownSha).toMatch(/^[0-9a-f]{64}$/);
    const signed = await json(
      base,
      'POST',
      `/api/sign/${token}/submit`,
      {
        name: 'Orla Brindlecombe',
        consent: true,
        intent: true,
        acknowledgedCautions: seeded.result.findings.filter((f) => f.outcome === 'fail').map((f) => f.ruleId),
        shownPdfSha256: shownSha,
        signature: { method: 'typed' },
      },
      { origin: base, ...forged },
    );
    expect(signed.status, signed.body).toBe(201);
    const documentId = (JSON.parse(signed.body) as { document: { id: string } }).document.id;
    const pdf = await fetch(`${base}/api/documents/${documentId}/file`, { headers: { cookie } });
    expect(pdf.status).toBe(200);
    return extractPdfText(new Uint8Array(await pdf.arrayBuffer()));
  }

  /** The link the PDF gives for the Verify page, white space (line breaks) taken out. */
  const verifyLinkIn = (text: string) => /Verify page \(([^)]*)\)/.exec(text)?.[1]?.replace(/\s+/g, '');

  it('absolute, from the configured origin or else the listening address, whatever the signer forged', async () => {
    const forged = forgeries[2]!.headers;
    const cases = [
      { base: bare.url, catcherUrl: `http://127.0.0.1:${httpPort}`, expected: `${bare.url}/verify` },
      {
        base: inject('baseUrl'),
        catcherUrl: inject('catcherUrl'),
        expected: `${inject('serverEnv').PUBLIC_URL}/verify`,
      },
    ];
    for (const { base, catcherUrl, expected } of cases) {
      const text = await signedPdfText(base, catcherUrl, forged);
      expect(verifyLinkIn(text), base).toBe(expected);
      expect(text).not.toContain('attacker.example');
    }
  }, 120_000);
});

describe('cookies do not follow the scheme a request claims', () => {
  it('a password sign-in claiming X-Forwarded-Proto: https on a plain-http server sets no Secure cookie', async () => {
    const forged = { 'x-forwarded-proto': 'https', 'x-forwarded-host': 'attacker.example' };
    const csrf = await raw(bare.url, '/api/auth/csrf', { headers: forged });
    const { csrfToken } = JSON.parse(csrf.body) as { csrfToken: string };
    const csrfCookies = csrf.headers['set-cookie'] ?? [];
    const res = await raw(bare.url, '/api/auth/callback/credentials', {
      method: 'POST',
      headers: {
        ...forged,
        origin: bare.url,
        cookie: csrfCookies.map((c) => c.split(';')[0]).join('; '),
        'content-type': 'application/x-www-form-urlencoded',
      },
      body: new URLSearchParams({
        email: org.office.email,
        password: fixturePassword,
        csrfToken,
        callbackUrl: '/',
      }).toString(),
    });
    expect(res.status, res.body).toBeLessThan(400);
    const cookies = [...csrfCookies, ...(res.headers['set-cookie'] ?? [])];
    expect(cookies.some((c) => c.startsWith('authjs.session-token='))).toBe(true);
    for (const cookie of cookies) {
      expect(cookie).not.toMatch(/;\s*secure/i);
      expect(cookie).not.toMatch(/^__(Secure|Host)-/);
    }
    // A redirect, if any, stays on the server's own address.
    if (res.headers.location) expect(new URL(res.headers.location, bare.url).origin).toBe(bare.url);
  });
});
