import { afterAll, beforeAll, describe, expect, inject, it, vi } from 'vitest';
import {
  anonymousClient,
  closeTestDb,
  createOrganisation,
  followHomeownerLink,
  hasSession,
  linkIn,
  requestHomeownerLink,
  signInHomeowner,
  testDb,
  waitForMail,
  caughtMailIds,
  type FixtureOrganisation,
} from './support/fixtures';

let org: FixtureOrganisation;
beforeAll(async () => {
  org = await createOrganisation('homeowner-link');
});
afterAll(async () => {
  await closeTestDb();
});

async function mailCountTo(email: string): Promise<number> {
  const list = (await (await fetch(`${inject('catcherUrl')}/messages`)).json()) as { to: string[] }[];
  return list.filter((m) => m.to.includes(email)).length;
}

async function newHomeowner(label: string): Promise<string> {
  return (await createOrganisation(label)).homeowner.email;
}

describe('homeowner sign-in by e-mailed link', () => {
  it('e-mails a one-time link that signs the homeowner in as themselves', async () => {
    const client = await signInHomeowner(org.homeowner.email);
    const session = await (await client.fetch('/api/auth/session')).json();
    expect(session.user.email).toBe(org.homeowner.email);
    expect(session.user.id).toBe(org.homeowner.id);
  });

  it('puts a link to this server in the e-mail, with the organisation named', async () => {
    const seen = await caughtMailIds(org.homeowner.email);
    await anonymousClient().json('POST', '/api/auth/email-link', { email: org.homeowner.email });
    const mail = await waitForMail(org.homeowner.email, seen);
    expect(mail.subject).toContain(org.name);
    const link = new URL(linkIn(mail.text, '/signin/link'));
    expect(link.origin).toBe(new URL(inject('baseUrl')).origin);
    expect(link.searchParams.get('token')).toMatch(/^[A-Za-z0-9_-]{43}$/);
  });

  it('does not use the link up when the page is merely opened (mail scanners prefetch)', async () => {
    const link = await requestHomeownerLink(await newHomeowner('link-prefetch'));
    const url = new URL(link);
    for (let i = 0; i < 2; i++) expect((await fetch(url)).status).toBe(200);
    const { client } = await followHomeownerLink(link);
    expect(hasSession(client)).toBe(true);
  });

  it('refuses the same link a second time', async () => {
    const link = await requestHomeownerLink(await newHomeowner('link-twice'));
    const first = await followHomeownerLink(link);
    expect(hasSession(first.client)).toBe(true);
    const second = await followHomeownerLink(link);
    expect(hasSession(second.client)).toBe(false);
    expect(second.response.status).toBe(401);
    expect((await second.response.json()).detail).toMatch(/expired or was already used/);
  });

  it('refuses an expired link and says so on the sign-in page', async () => {
    const fresh = await createOrganisation('link-expired');
    const link = await requestHomeownerLink(fresh.homeowner.email);
    await testDb()('sign_in_links')
      .where({ user_id: fresh.homeowner.id })
      .whereNull('used_at')
      .update({ expires_at: new Date(Date.now() - 1000) });
    const client = anonymousClient();
    const page = await client.fetch(new URL(link).pathname + new URL(link).search);
    const csrfToken = /name="csrfToken" value="([^"]+)"/.exec(await page.text())?.[1] ?? '';
    const res = await client.fetch('/api/auth/callback/email-link', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
      body: new URLSearchParams({
        csrfToken,
        token: new URL(link).searchParams.get('token') ?? '',
        callbackUrl: '/',
      }),
    });
    expect(hasSession(client)).toBe(false);
    const location = res.headers.get('location') ?? '';
    expect(new URLSearchParams(location.split('?')[1]).get('code')).toBe('link');
    const signin = await (await client.fetch(location)).text();
    expect(signin).toContain('expired or was already used');
  });

  it('refuses a made-up token', async () => {
    const { client, response } = await followHomeownerLink(
      `${inject('baseUrl')}/signin/link?token=${'A'.repeat(43)}`,
    );
    expect(hasSession(client)).toBe(false);
    expect(response.status).toBe(401);
  });

  it('answers an unknown address like a known one and sends nothing', async () => {
    const unknown = `stranger-${Date.now()}@fixtures.test`;
    const res = await anonymousClient().json('POST', '/api/auth/email-link', { email: unknown });
    expect(res.status).toBe(202);
    const known = await anonymousClient().json('POST', '/api/auth/email-link', {
      email: await newHomeowner('link-known'),
    });
    expect(await res.json()).toEqual(await known.json());
    await new Promise((r) => setTimeout(r, 500));
    expect(await mailCountTo(unknown)).toBe(0);
  });

  it('sends no link to a staff address (staff use their password)', async () => {
    const res = await anonymousClient().json('POST', '/api/auth/email-link', { email: org.office.email });
    expect(res.status).toBe(202);
    await new Promise((r) => setTimeout(r, 500));
    expect(await mailCountTo(org.office.email)).toBe(0);
  });

  it('rejects a malformed request naming the field', async () => {
    const res = await anonymousClient().json('POST', '/api/auth/email-link', {
      email: 'not-an-address',
      extra: 1,
    });
    expect(res.status).toBe(422);
    const fields = (await res.json()).errors.map((e: { field: string }) => e.field);
    expect(fields).toContain('email');
    expect(fields).toContain('extra');
  });

  it('pauses one client after 5 requests for an address, not the homeowner asking from elsewhere', async () => {
    // Common practice, no source: 5 per (address, client) and 15 per address in 15 minutes.
    const email = await newHomeowner('link-flood');
    const stranger = anonymousClient();
    for (let i = 0; i < 5; i++)
      expect((await stranger.json('POST', '/api/auth/email-link', { email })).status).toBe(202);
    const sixth = await stranger.json('POST', '/api/auth/email-link', { email });
    expect(sixth.status).toBe(429);
    expect(Number(sixth.headers.get('retry-after'))).toBeGreaterThan(0);
    expect((await sixth.json()).detail).toMatch(/Too many sign-in links/);
    // The homeowner, on their own connection, still gets a link.
    expect((await anonymousClient().json('POST', '/api/auth/email-link', { email })).status).toBe(202);
  });

  it('sends at most 15 links to one address in 15 minutes, however many clients ask', async () => {
    const email = await newHomeowner('link-flood-wide');
    for (let i = 0; i < 15; i++)
      expect((await anonymousClient().json('POST', '/api/auth/email-link', { email })).status).toBe(202);
    expect((await anonymousClient().json('POST', '/api/auth/email-link', { email })).status).toBe(429);
    // Delivery through the outbox takes a moment under load.
    await vi.waitFor(async () => expect(await mailCountTo(email)).toBe(15), {
      timeout: 30_000,
      interval: 250,
    });
  });

  it('stores only a hash of the token', async () => {
    const fresh = await createOrganisation('link-hash');
    const link = await requestHomeownerLink(fresh.homeowner.email);
    const token = new URL(link).searchParams.get('token') ?? '';
    const rows = await testDb()('sign_in_links').where({ user_id: fresh.homeowner.id }).select('token_hash');
    expect(rows.length).toBeGreaterThan(0);
    expect(rows.some((r) => r.token_hash === token)).toBe(false);
    expect(rows.every((r) => /^[0-9a-f]{64}$/.test(r.token_hash))).toBe(true);
  });

  it('refuses a deactivated homeowner with a link sent before deactivation', async () => {
    const fresh = await createOrganisation('link-deactivated');
    const link = await requestHomeownerLink(fresh.homeowner.email);
    await testDb()('users').where({ id: fresh.homeowner.id }).update({ active: false });
    const { client } = await followHomeownerLink(link);
    expect(hasSession(client)).toBe(false);
  });
});
