import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { freePort, startAppServer } from '../../src/cli/services';
import {
  anonymousClient,
  closeTestDb,
  createOrganisation,
  fixturePassword,
  hasSession,
  postCredentials,
  signIn,
  testAddress,
  testDb,
  type FixtureOrganisation,
} from './support/fixtures';

let org: FixtureOrganisation;
beforeAll(async () => {
  org = await createOrganisation('sign-in');
});
afterAll(async () => {
  await closeTestDb();
});

const someAddress = testAddress;

async function attempt(email: string, password: string, ip: string, accept = 'application/json') {
  const client = anonymousClient();
  const response = await postCredentials(
    client,
    'credentials',
    { email, password, callbackUrl: '/' },
    { 'x-forwarded-for': ip, accept },
  );
  return { client, response };
}

async function newStaffMember(label: string): Promise<string> {
  const fresh = await createOrganisation(label);
  return fresh.auditor.email;
}

describe('staff sign-in with e-mail and password', () => {
  it('signs an active staff member in and fills the session for the API', async () => {
    const owner = await signIn(org.owner.email, fixturePassword);
    const res = await owner.json('GET', '/api/organisation');
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.id).toBe(org.id);
    expect(body.slug).toBe(org.slug);
  });

  it('redirects to the requested page after signing in', async () => {
    const { response, client } = await (async () => {
      const c = anonymousClient();
      const r = await postCredentials(
        c,
        'credentials',
        { email: org.office.email, password: fixturePassword, callbackUrl: '/clients?kind=business' },
        { accept: 'text/html' },
      );
      return { response: r, client: c };
    })();
    expect(hasSession(client)).toBe(true);
    expect(response.status).toBe(302);
    expect(
      new URL(response.headers.get('location') ?? '').pathname +
        new URL(response.headers.get('location') ?? '').search,
    ).toBe('/clients?kind=business');
  });

  it('does not follow a next target on another site', async () => {
    const c = anonymousClient();
    const r = await postCredentials(
      c,
      'credentials',
      { email: org.office.email, password: fixturePassword, callbackUrl: 'https://elsewhere.test/steal' },
      { accept: 'text/html' },
    );
    expect(hasSession(c)).toBe(true);
    expect(new URL(r.headers.get('location') ?? '').host).toBe(new URL(inject('baseUrl')).host);
  });

  it('refuses a wrong password with 401 problem+json and no session', async () => {
    const { response, client } = await attempt(org.owner.email, 'not-the-password', someAddress());
    expect(response.status).toBe(401);
    expect(response.headers.get('content-type')).toContain('application/problem+json');
    expect((await response.json()).detail).toMatch(/e-mail address or password is not right/);
    expect(hasSession(client)).toBe(false);
  });

  it('answers an unknown address exactly as a wrong password', async () => {
    const unknown = await attempt(`nobody-${Date.now()}@fixtures.test`, 'whatever-password', someAddress());
    const wrong = await attempt(org.office.email, 'whatever-password', someAddress());
    expect(unknown.response.status).toBe(wrong.response.status);
    expect(await unknown.response.json()).toEqual(await wrong.response.json());
  });

  it('sends a browser back to the sign-in page, which says the password or address is wrong', async () => {
    const { response } = await attempt(org.owner.email, 'not-the-password', someAddress(), 'text/html');
    expect(response.status).toBe(303);
    const location = response.headers.get('location') ?? '';
    expect(location).toMatch(/^\/signin\?/);
    expect(new URLSearchParams(location.split('?')[1]).get('code')).toBe('credentials');
    const page = await (await fetch(new URL(location, inject('baseUrl')))).text();
    expect(page).toContain('do not match an active staff account');
  });

  it('keeps the next target on the sign-in page after a refusal', async () => {
    const c = anonymousClient();
    const r = await postCredentials(
      c,
      'credentials',
      { email: org.owner.email, password: 'nope-nope-nope', callbackUrl: '/staff' },
      { accept: 'text/html', 'x-forwarded-for': someAddress() },
    );
    expect(new URLSearchParams((r.headers.get('location') ?? '').split('?')[1]).get('next')).toBe('/staff');
  });

  it('refuses a homeowner with a password form (they sign in by link only)', async () => {
    const { response } = await attempt(org.homeowner.email, fixturePassword, someAddress());
    expect(response.status).toBe(401);
  });

  it('issues an HttpOnly, SameSite=Lax session cookie without Secure over plain HTTP', async () => {
    const client = anonymousClient();
    await client.fetch('/api/auth/csrf');
    const csrf = (await (await client.fetch('/api/auth/csrf')).json()).csrfToken;
    const res = await client.fetch('/api/auth/callback/credentials', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({
        email: org.auditor.email,
        password: fixturePassword,
        csrfToken: csrf,
        callbackUrl: '/',
      }),
    });
    const cookie = res.headers.getSetCookie().find((c) => c.startsWith('authjs.session-token='));
    expect(cookie).toBeDefined();
    expect(cookie).toMatch(/;\s*HttpOnly/i);
    expect(cookie).toMatch(/;\s*SameSite=Lax/i);
    expect(cookie).not.toMatch(/;\s*Secure/i);
  });

  it('marks the session cookie Secure (and __Secure-) when the public URL is https', async () => {
    // A server whose configured public URL is https, as behind a TLS-terminating proxy.
    const port = await freePort();
    const publicUrl = `https://127.0.0.1:${port}`;
    const server = await startAppServer({
      port,
      quiet: true,
      env: { ...inject('serverEnv'), PUBLIC_URL: publicUrl, OUTBOX_WORKER: 'off' },
    });
    try {
      await expectSecureCookies(server.url, publicUrl);
    } finally {
      await server.stop();
    }
  });

  async function expectSecureCookies(baseUrl: string, publicUrl: string) {
    const tls = { 'x-forwarded-proto': 'https' };
    const csrfRes = await fetch(new URL('/api/auth/csrf', baseUrl), { headers: tls });
    const csrfCookie = csrfRes.headers.getSetCookie().find((c) => c.startsWith('__Host-authjs.csrf-token='));
    expect(csrfCookie).toMatch(/;\s*Secure/i);
    const { csrfToken } = await csrfRes.json();
    const res = await fetch(new URL('/api/auth/callback/credentials', baseUrl), {
      method: 'POST',
      redirect: 'manual',
      headers: {
        ...tls,
        origin: publicUrl,
        'content-type': 'application/x-www-form-urlencoded',
        cookie: csrfCookie?.split(';')[0] ?? '',
      },
      body: new URLSearchParams({
        email: org.auditor.email,
        password: fixturePassword,
        csrfToken,
        callbackUrl: '/',
      }),
    });
    const session = res.headers.getSetCookie().find((c) => c.startsWith('__Secure-authjs.session-token='));
    expect(session).toBeDefined();
    expect(session).toMatch(/;\s*Secure/i);
    expect(session).toMatch(/;\s*HttpOnly/i);
    expect(session).toMatch(/;\s*SameSite=Lax/i);
  }

  it('refuses a sign-in post without the CSRF token', async () => {
    const client = anonymousClient();
    const res = await client.fetch('/api/auth/callback/credentials', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ email: org.owner.email, password: fixturePassword }),
    });
    expect(hasSession(client)).toBe(false);
    expect(res.status).toBe(403);
  });
});

describe('sign-in throttling', () => {
  it('pauses an account from an address after 5 failures there, even for the right password, and says so', async () => {
    const email = await newStaffMember('throttle-account');
    const ip = someAddress();
    for (let i = 0; i < 5; i++)
      expect((await attempt(email, `wrong-${i}-password`, ip)).response.status).toBe(401);
    const { response, client } = await attempt(email, fixturePassword, ip);
    expect(response.status).toBe(429);
    expect(Number(response.headers.get('retry-after'))).toBeGreaterThan(0);
    expect((await response.json()).detail).toMatch(/Too many sign-in attempts/);
    expect(hasSession(client)).toBe(false);

    const html = await attempt(email, fixturePassword, ip, 'text/html');
    const location = html.response.headers.get('location') ?? '';
    expect(new URLSearchParams(location.split('?')[1]).get('code')).toBe('throttled');
    const page = await (await fetch(new URL(location, inject('baseUrl')))).text();
    expect(page).toMatch(/Too many sign-in attempts/);
    expect(page).toMatch(/try again in about \d+ minutes/);
  });

  it("does not let a stranger's failures lock the owner out from another address", async () => {
    const email = await newStaffMember('throttle-stranger');
    const stranger = someAddress();
    const owner = someAddress();
    for (let i = 0; i < 6; i++) await attempt(email, `stranger-guess-${i}`, stranger);
    const ownerSignIn = await attempt(email, fixturePassword, owner);
    expect(hasSession(ownerSignIn.client)).toBe(true);
    // The owner's success elsewhere does not reopen the stranger's address for this account.
    const again = await attempt(email, fixturePassword, stranger);
    expect(again.response.status).toBe(429);
    expect(hasSession(again.client)).toBe(false);
    const throttled = await testDb()('audit_events')
      .where({ action: 'sign_in.throttled' })
      .whereRaw("detail->>'email' = ?", [email])
      .select('ip', 'detail');
    // The stranger's sixth guess and the later try were throttled; nothing from the owner's address was.
    expect(throttled.map((e) => [e.ip, e.detail.scope])).toEqual([
      [stranger, 'account'],
      [stranger, 'account'],
    ]);
  });

  it('throttles per account: another account from the same address still signs in', async () => {
    const ip = someAddress();
    const locked = await newStaffMember('throttle-a');
    const other = await newStaffMember('throttle-b');
    for (let i = 0; i < 5; i++) await attempt(locked, `wrong-${i}-password`, ip);
    expect((await attempt(locked, fixturePassword, ip)).response.status).toBe(429);
    const ok = await attempt(other, fixturePassword, ip);
    expect(hasSession(ok.client)).toBe(true);
  });

  it('does not count failures before a successful sign-in', async () => {
    const email = await newStaffMember('throttle-reset');
    for (let i = 0; i < 4; i++) await attempt(email, `wrong-${i}-password`, someAddress());
    expect(hasSession((await attempt(email, fixturePassword, someAddress())).client)).toBe(true);
    for (let i = 0; i < 4; i++) await attempt(email, `wrong-again-${i}`, someAddress());
    expect(hasSession((await attempt(email, fixturePassword, someAddress())).client)).toBe(true);
  });

  it('throttles per address: 20 failures from one address pause it for every account', async () => {
    const ip = someAddress();
    for (let i = 0; i < 20; i++)
      expect(
        (await attempt(`guess-${i}-${Date.now()}@fixtures.test`, 'guess-password', ip)).response.status,
      ).toBe(401);
    const email = await newStaffMember('throttle-ip');
    const blocked = await attempt(email, fixturePassword, ip);
    expect(blocked.response.status).toBe(429);
    const elsewhere = await attempt(email, fixturePassword, someAddress());
    expect(hasSession(elsewhere.client)).toBe(true);
  });
});

describe('the sign-in audit trail', () => {
  it('records success and failure with the e-mail tried, never the password', async () => {
    const fresh = await createOrganisation('audit-sign-in');
    const secretGuess = `guess-${Date.now()}-secret`;
    await attempt(fresh.office.email, secretGuess, someAddress());
    await signIn(fresh.office.email, fixturePassword);
    const events = await testDb()('audit_events')
      .where({ organisation_id: fresh.id })
      .orderBy('id')
      .select('action', 'actor_label', 'entity_id', 'detail');
    const failed = events.find((e) => e.action === 'sign_in.failed');
    const succeeded = events.find((e) => e.action === 'sign_in.succeeded');
    expect(failed?.detail.email).toBe(fresh.office.email);
    expect(failed?.detail.reason).toBe('wrong_password');
    expect(succeeded?.entity_id).toBe(fresh.office.id);
    expect(JSON.stringify(events)).not.toContain(secretGuess);
    expect(JSON.stringify(events)).not.toContain(fixturePassword);
  });
});
