/**
 * Staff "forgot password" over real HTTP: the /signin/forgot form queues a one-time link (read
 * here from the mail catcher), the /signin/reset page sets a new password with it, and every
 * session of the person ends.
 */
import { afterAll, describe, expect, inject, it, vi } from 'vitest';
import {
  anonymousClient,
  caughtMailIds,
  closeTestDb,
  createOrganisation,
  fixturePassword,
  followHomeownerLink,
  hasSession,
  linkIn,
  postCredentials,
  requestHomeownerLink,
  signIn,
  testDb,
  waitForMail,
  type TestClient,
} from './support/fixtures';

afterAll(async () => {
  await closeTestDb();
});

const form = { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' };

function askForReset(email: string, client: TestClient = anonymousClient()): Promise<Response> {
  return client.fetch('/signin/forgot', {
    method: 'POST',
    headers: form,
    body: new URLSearchParams({ email }),
  });
}

async function resetLinkFor(email: string): Promise<string> {
  const seen = await caughtMailIds(email);
  const res = await askForReset(email);
  if (res.status !== 200) throw new Error(`asking for a reset for ${email} answered ${res.status}`);
  const mail = await waitForMail(email, seen);
  return linkIn(mail.text, '/signin/reset');
}

/** Opens the link page as a browser would, then posts the new password. */
async function useResetLink(
  link: string,
  password: string,
  client: TestClient = anonymousClient(),
  confirm = password,
): Promise<Response> {
  const url = new URL(link);
  const page = await client.fetch(url.pathname + url.search);
  expect(page.status).toBe(200);
  const token = url.searchParams.get('token') ?? '';
  return client.fetch('/signin/reset', {
    method: 'POST',
    headers: form,
    body: new URLSearchParams({ token, password, confirm }),
  });
}

async function resetMailsTo(email: string): Promise<number> {
  const list = (await (await fetch(`${inject('catcherUrl')}/messages`)).json()) as {
    to: string[];
    subject: string;
  }[];
  return list.filter((m) => m.to.includes(email) && /reset/i.test(m.subject)).length;
}

async function passwordWorks(email: string, password: string): Promise<boolean> {
  const client = anonymousClient();
  await postCredentials(client, 'credentials', { email, password, callbackUrl: '/' });
  return hasSession(client);
}

const newPassword = 'a-reset-gate-pass-2027';

describe('staff forgot password', () => {
  it('links to the form from the sign-in page', async () => {
    expect(await (await anonymousClient().fetch('/signin')).text()).toContain('href="/signin/forgot"');
    const page = await anonymousClient().fetch('/signin/forgot');
    expect(page.status).toBe(200);
    expect(await page.text()).toMatch(/name="email"/);
  });

  it('resets the password once: the old password and every existing session are refused afterwards', async () => {
    const org = await createOrganisation('reset-works');
    const existing = await signIn(org.office.email, fixturePassword);
    expect((await existing.json('GET', '/api/organisation')).status).toBe(200);

    const link = await resetLinkFor(org.office.email);
    expect(new URL(link).origin).toBe(new URL(inject('baseUrl')).origin);
    // Opening the page (a mail scanner's prefetch) uses nothing up.
    expect((await fetch(link)).status).toBe(200);
    const res = await useResetLink(link, newPassword);
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe('/signin?reset=1');

    expect((await existing.json('GET', '/api/organisation')).status).toBe(401);
    expect(await passwordWorks(org.office.email, fixturePassword)).toBe(false);
    expect(await passwordWorks(org.office.email, newPassword)).toBe(true);

    const actions = await testDb()('audit_events')
      .where({ organisation_id: org.id, entity_id: org.office.id })
      .whereIn('action', ['password.reset_requested', 'password.reset'])
      .orderBy('id')
      .pluck('action');
    expect(actions).toEqual(['password.reset_requested', 'password.reset']);
  });

  it('refuses the same link a second time and changes nothing', async () => {
    const org = await createOrganisation('reset-twice');
    const link = await resetLinkFor(org.auditor.email);
    expect((await useResetLink(link, newPassword)).status).toBe(303);
    const before = await testDb()('users')
      .where({ id: org.auditor.id })
      .first('password_hash', 'session_version');
    const second = await useResetLink(link, 'yet-another-pass-2028');
    expect(second.status).toBe(410);
    expect(await second.text()).toContain('expired or was already used');
    expect(
      await testDb()('users').where({ id: org.auditor.id }).first('password_hash', 'session_version'),
    ).toEqual(before);
    expect(await passwordWorks(org.auditor.email, 'yet-another-pass-2028')).toBe(false);
  });

  it('refuses an expired link and keeps the old password', async () => {
    const org = await createOrganisation('reset-expired');
    const link = await resetLinkFor(org.owner.email);
    await testDb()('sign_in_links')
      .where({ user_id: org.owner.id, purpose: 'password_reset' })
      .update({ expires_at: new Date(Date.now() - 1000) });
    expect((await useResetLink(link, newPassword)).status).toBe(410);
    expect(await passwordWorks(org.owner.email, fixturePassword)).toBe(true);
  });

  it('makes the link valid for 30 minutes and stores only a hash of its token', async () => {
    const org = await createOrganisation('reset-hash');
    const before = Date.now();
    const token = new URL(await resetLinkFor(org.office.email)).searchParams.get('token') ?? '';
    const rows = await testDb()('sign_in_links')
      .where({ user_id: org.office.id })
      .select('token_hash', 'purpose', 'expires_at');
    expect(rows).toHaveLength(1);
    expect(rows[0].purpose).toBe('password_reset');
    expect(rows[0].token_hash).toMatch(/^[0-9a-f]{64}$/);
    expect(rows[0].token_hash).not.toBe(token);
    const minutes = (new Date(rows[0].expires_at).getTime() - before) / 60_000;
    expect(minutes).toBeGreaterThan(29.5);
    expect(minutes).toBeLessThanOrEqual(30.5);
  });

  it('answers an unknown address exactly like a known one and sends nothing', async () => {
    const org = await createOrganisation('reset-unknown');
    const unknown = `stranger-${Date.now()}@fixtures.test`;
    const known = await askForReset(org.office.email);
    const stranger = await askForReset(unknown);
    expect(stranger.status).toBe(known.status);
    expect((await stranger.text()).replaceAll(unknown, '@')).toBe(
      (await known.text()).replaceAll(org.office.email, '@'),
    );
    await new Promise((r) => setTimeout(r, 800));
    expect(await resetMailsTo(unknown)).toBe(0);
    expect(await resetMailsTo(org.office.email)).toBe(1);
  });

  it('sends nothing to a homeowner (no password) and answers the same', async () => {
    const org = await createOrganisation('reset-homeowner');
    const res = await askForReset(org.homeowner.email);
    expect(res.status).toBe(200);
    expect(await res.text()).toContain('Check your inbox');
    await new Promise((r) => setTimeout(r, 800));
    expect(await resetMailsTo(org.homeowner.email)).toBe(0);
    expect(
      await testDb()('sign_in_links').where({ user_id: org.homeowner.id }).count({ n: '*' }).first(),
    ).toEqual({ n: '0' });
  });

  it('keeps reset and sign-in links apart', async () => {
    const org = await createOrganisation('reset-purpose');
    const reset = await resetLinkFor(org.office.email);
    const asSignIn = await followHomeownerLink(
      `${inject('baseUrl')}/signin/link?token=${new URL(reset).searchParams.get('token')}`,
    );
    expect(hasSession(asSignIn.client)).toBe(false);
    const signInLink = await requestHomeownerLink(org.homeowner.email);
    const asReset = await useResetLink(
      `${inject('baseUrl')}/signin/reset?token=${new URL(signInLink).searchParams.get('token')}`,
      newPassword,
    );
    expect(asReset.status).toBe(410);
    // Neither attempt used the other link up.
    expect((await useResetLink(reset, newPassword)).status).toBe(303);
  });

  it('refuses a 9-character password or a differing second copy without using the link up, then takes one of exactly 10', async () => {
    const org = await createOrganisation('reset-short');
    const link = await resetLinkFor(org.auditor2.email);
    const short = await useResetLink(link, '123456789');
    expect(short.status).toBe(422);
    expect(await short.text()).toContain('at least 10 characters');
    const differing = await useResetLink(link, '1234567890', anonymousClient(), '1234567891');
    expect(differing.status).toBe(422);
    expect(await differing.text()).toContain('not the same');
    expect(await passwordWorks(org.auditor2.email, fixturePassword)).toBe(true);
    expect((await useResetLink(link, '1234567890')).status).toBe(303);
    expect(await passwordWorks(org.auditor2.email, '1234567890')).toBe(true);
  });

  it('pauses one client after 5 requests for an address, while the person asks from elsewhere', async () => {
    // Common practice, no source: 5 per (address, client) and 15 per address in 15 minutes.
    const org = await createOrganisation('reset-flood');
    const stranger = anonymousClient();
    for (let i = 0; i < 5; i++) expect((await askForReset(org.office.email, stranger)).status).toBe(200);
    const sixth = await askForReset(org.office.email, stranger);
    expect(sixth.status).toBe(429);
    expect(Number(sixth.headers.get('retry-after'))).toBeGreaterThan(0);
    expect(await sixth.text()).toContain('Too many reset links');
    expect((await askForReset(org.office.email)).status).toBe(200);
    for (let i = 0; i < 9; i++) expect((await askForReset(org.office.email)).status).toBe(200);
    expect((await askForReset(org.office.email)).status).toBe(429);
    // Delivery through the outbox takes a moment under load.
    await vi.waitFor(async () => expect(await resetMailsTo(org.office.email)).toBe(15), {
      timeout: 30_000,
      interval: 250,
    });
  });

  it('stops one client address after 20 requests in 15 minutes, whatever addresses it names', async () => {
    const client = anonymousClient();
    for (let i = 0; i < 20; i++)
      expect((await askForReset(`flood-${i}-${Date.now()}@fixtures.test`, client)).status).toBe(200);
    expect((await askForReset(`flood-last-${Date.now()}@fixtures.test`, client)).status).toBe(429);
    expect((await askForReset(`flood-other-${Date.now()}@fixtures.test`)).status).toBe(200);
  });

  it('refuses a cross-site post and an oversized body, sending nothing', async () => {
    const org = await createOrganisation('reset-hostile');
    const client = anonymousClient();
    const cross = await client.fetch('/signin/forgot', {
      method: 'POST',
      headers: { ...form, origin: 'https://elsewhere.example' },
      body: new URLSearchParams({ email: org.office.email }),
    });
    expect(cross.status).toBe(403);
    const big = await client.fetch('/signin/forgot', {
      method: 'POST',
      headers: form,
      body: new URLSearchParams({ email: org.office.email, pad: 'x'.repeat(70 * 1024) }),
    });
    expect(big.status).toBe(413);
    await new Promise((r) => setTimeout(r, 800));
    expect(await resetMailsTo(org.office.email)).toBe(0);
  });
});
