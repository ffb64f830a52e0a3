/**
 * Signing out ends the session on the server (its id is revoked), so a copy of the cookie taken
 * before is refused; the person's other sessions go on. A password change ends every other
 * session and keeps the one that made it.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import {
  anonymousClient,
  closeTestDb,
  createOrganisation,
  fixturePassword,
  hasSession,
  postCredentials,
  signIn,
  signInHomeowner,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';

const baseUrl = inject('baseUrl');
let org: FixtureOrganisation;
beforeAll(async () => {
  org = await createOrganisation('revocation');
});
afterAll(async () => {
  await closeTestDb();
});

/** A request with only the given cookie, as someone who copied it would send. */
function withCookie(cookie: string, path: string) {
  return fetch(`${baseUrl}${path}`, { headers: { cookie, accept: 'application/json' }, redirect: 'manual' });
}

async function navSignOut(client: TestClient) {
  return client.fetch('/auth/signout', {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded' },
    body: '',
  });
}

async function changePassword(client: TestClient, body: unknown) {
  return client.json('POST', '/api/account/password', body);
}

describe('signing out ends the session on the server', () => {
  it('refuses a copied cookie after the navigation button signed out, while another session of the same person goes on', async () => {
    const fresh = await createOrganisation('revoke-nav');
    const laptop = await signIn(fresh.office.email, fixturePassword);
    const phone = await signIn(fresh.office.email, fixturePassword);
    const copied = laptop.cookie;
    expect((await withCookie(copied, '/api/organisation')).status).toBe(200);

    expect((await navSignOut(laptop)).status).toBe(303);
    const refused = await withCookie(copied, '/api/organisation');
    expect(refused.status).toBe(401);
    // A page with the copied cookie goes to sign-in, and the dead cookie is cleared.
    const page = await withCookie(copied, '/clients');
    expect(page.status).toBe(302);
    expect(page.headers.get('location')).toMatch(/^\/signin\?next=/);
    expect(
      page.headers
        .getSetCookie()
        .some(
          (c) =>
            /authjs\.session-token=;/.test(c) ||
            /authjs\.session-token=[^;]*;.*(Max-Age=0|Expires=Thu, 01 Jan 1970)/i.test(c),
        ),
    ).toBe(true);

    expect((await phone.json('GET', '/api/organisation')).status).toBe(200);
    const revoked = await testDb()('revoked_sessions')
      .where({ user_id: fresh.office.id })
      .select('expires_at');
    expect(revoked).toHaveLength(1);
    expect(new Date(revoked[0].expires_at).getTime()).toBeGreaterThan(Date.now() + 6 * 24 * 3600_000);
  });

  it("refuses a copied cookie after auth core's own sign-out endpoint, and its session endpoint says nobody", async () => {
    const fresh = await createOrganisation('revoke-core');
    const auditor = await signIn(fresh.auditor.email, fixturePassword);
    const copied = auditor.cookie;
    const { csrfToken } = await (await auditor.fetch('/api/auth/csrf')).json();
    const res = await auditor.fetch('/api/auth/signout', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ csrfToken }),
    });
    expect(res.status).toBeGreaterThanOrEqual(300);
    expect(hasSession(auditor)).toBe(false);
    expect((await withCookie(copied, '/api/organisation')).status).toBe(401);
    const session = await (await withCookie(copied, '/api/auth/session')).json();
    expect(session?.user ?? null).toBeNull();
  });

  it('refuses a cookie refreshed by the session endpoint before sign-out too (the id outlives the token)', async () => {
    const fresh = await createOrganisation('revoke-refresh');
    const owner = await signIn(fresh.owner.email, fixturePassword);
    const first = owner.cookie;
    // Auth core re-encodes the token on this call (a new token id, a new expiry).
    await owner.fetch('/api/auth/session', { headers: { accept: 'application/json' } });
    const refreshed = owner.cookie;
    expect((await navSignOut(owner)).status).toBe(303);
    expect((await withCookie(first, '/api/organisation')).status).toBe(401);
    expect((await withCookie(refreshed, '/api/organisation')).status).toBe(401);
  });

  it("ends a homeowner's link session the same way", async () => {
    const homeowner = await signInHomeowner(org.homeowner.email);
    const copied = homeowner.cookie;
    expect((await withCookie(copied, '/api/assessments')).status).toBe(200);
    expect((await navSignOut(homeowner)).status).toBe(303);
    expect((await withCookie(copied, '/api/assessments')).status).toBe(401);
  });
});

describe('changing one’s own password', () => {
  it('changes it, keeps this session and ends every other one', async () => {
    const fresh = await createOrganisation('password-change');
    const here = await signIn(fresh.auditor.email, fixturePassword);
    const elsewhere = await signIn(fresh.auditor.email, fixturePassword);
    const newPassword = 'a-new-gate-pass-2027';
    const res = await changePassword(here, { currentPassword: fixturePassword, newPassword });
    expect(res.status).toBe(204);
    expect((await here.json('GET', '/api/organisation')).status).toBe(200);
    expect((await elsewhere.json('GET', '/api/organisation')).status).toBe(401);

    const old = await postCredentials(anonymousClient(), 'credentials', {
      email: fresh.auditor.email,
      password: fixturePassword,
      callbackUrl: '/',
    });
    expect(old.status).toBe(401);
    await signIn(fresh.auditor.email, newPassword);
    const events = await testDb()('audit_events')
      .where({ organisation_id: fresh.id, action: 'password.changed' })
      .select('entity_id');
    expect(events.map((e) => e.entity_id)).toEqual([fresh.auditor.id]);
  });

  it('refuses a wrong current password with 422 naming the field, and changes nothing', async () => {
    const fresh = await createOrganisation('password-wrong');
    const office = await signIn(fresh.office.email, fixturePassword);
    const before = await testDb()('users')
      .where({ id: fresh.office.id })
      .first('password_hash', 'session_version');
    const res = await changePassword(office, {
      currentPassword: 'not-the-password',
      newPassword: 'another-pass-2027',
    });
    expect(res.status).toBe(422);
    expect(res.headers.get('content-type')).toMatch(/problem\+json/);
    expect((await res.json()).errors).toEqual([{ field: 'currentPassword', message: 'is not right' }]);
    expect(
      await testDb()('users').where({ id: fresh.office.id }).first('password_hash', 'session_version'),
    ).toEqual(before);
    expect((await office.json('GET', '/api/organisation')).status).toBe(200);
  });

  it('refuses a new password of 9 characters and takes one of exactly 10', async () => {
    const fresh = await createOrganisation('password-short');
    const owner = await signIn(fresh.owner.email, fixturePassword);
    const short = await changePassword(owner, { currentPassword: fixturePassword, newPassword: '123456789' });
    expect(short.status).toBe(422);
    expect((await short.json()).errors.map((e: { field: string }) => e.field)).toEqual(['newPassword']);
    expect(
      (await changePassword(owner, { currentPassword: fixturePassword, newPassword: '1234567890' })).status,
    ).toBe(204);
  });

  it('counts wrong current passwords like failed sign-ins: the sixth try is 429', async () => {
    const fresh = await createOrganisation('password-guess');
    const auditor = await signIn(fresh.auditor2.email, fixturePassword);
    for (let i = 0; i < 5; i++)
      expect(
        (
          await changePassword(auditor, {
            currentPassword: `guess-${i}-password`,
            newPassword: 'another-pass-2027',
          })
        ).status,
      ).toBe(422);
    const sixth = await changePassword(auditor, {
      currentPassword: fixturePassword,
      newPassword: 'another-pass-2027',
    });
    expect(sixth.status).toBe(429);
    expect(Number(sixth.headers.get('retry-after'))).toBeGreaterThan(0);
  });

  it('is for staff only (a homeowner has no password) and needs a session', async () => {
    const homeowner = await signInHomeowner(org.homeowner.email);
    expect(
      (await changePassword(homeowner, { currentPassword: 'x', newPassword: 'another-pass-2027' })).status,
    ).toBe(403);
    expect(
      (await changePassword(anonymousClient(), { currentPassword: 'x', newPassword: 'another-pass-2027' }))
        .status,
    ).toBe(401);
  });

  it('works from the account page form too', async () => {
    const fresh = await createOrganisation('password-page');
    const office = await signIn(fresh.office.email, fixturePassword);
    const page = await office.fetch('/account');
    expect(page.status).toBe(200);
    expect(await page.text()).toMatch(/Change your password/);
    const res = await office.fetch('/account', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ currentPassword: fixturePassword, newPassword: 'page-changed-pass-1' }),
    });
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe('/account?changed');
    expect((await office.json('GET', '/api/organisation')).status).toBe(200);
    await signIn(fresh.office.email, 'page-changed-pass-1');
  });
});
