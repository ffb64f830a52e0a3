/**
 * The pages an e-mailed link opens (homeowner sign-in, staff invitation) carry a token in
 * their URL. They keep it from other sites with `Referrer-Policy: same-origin`, and their
 * forms pass the same-site check even from a browser that sends `Origin: null` (as one does
 * under a stricter referrer policy): a null Origin is taken as same-site only together with
 * `Sec-Fetch-Site: same-origin`, which page scripts cannot set. A cross-site post (another
 * Origin, or Sec-Fetch-Site cross-site / same-site) is refused: a readable page for a browser
 * form, problem+json for an API caller, and nothing changes.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import {
  anonymousClient,
  caughtMailIds,
  createOrganisation,
  fixturePassword,
  hasSession,
  linkIn,
  postCredentials,
  requestHomeownerLink,
  signIn,
  testDb,
  waitForMail,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';

let org: FixtureOrganisation;
let owner: TestClient;

beforeAll(async () => {
  org = await createOrganisation('link-origin');
  owner = await signIn(org.owner.email, fixturePassword);
});

const browserForm = {
  accept: 'text/html,application/xhtml+xml;q=0.9,*/*;q=0.8',
  'sec-fetch-mode': 'navigate',
  'sec-fetch-dest': 'document',
};
const opaqueSameOrigin = { origin: 'null', 'sec-fetch-site': 'same-origin' };

async function invitationToken(): Promise<{ email: string; token: string }> {
  const email = `origin-invitee-${Date.now()}-${Math.floor(Math.random() * 1e6)}@fixtures.test`;
  const seen = await caughtMailIds(email);
  expect((await owner.json('POST', '/api/invitations', { email, role: 'auditor' })).status).toBe(201);
  const link = linkIn((await waitForMail(email, seen)).text, '/invite/');
  return { email, token: new URL(link).pathname.split('/').pop() ?? '' };
}

function acceptForm(client: TestClient, token: string, headers: Record<string, string>) {
  return client.fetch(`/invite/${token}`, {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded', ...browserForm, ...headers },
    body: new URLSearchParams({
      name: 'Tamsin Orrery',
      password: 'orrery-tamsin-pass',
      confirm: 'orrery-tamsin-pass',
    }),
  });
}

describe('the link pages', () => {
  it('keep their token from other sites but not from their own forms', async () => {
    const link = new URL(await requestHomeownerLink(org.homeowner.email));
    const signInPage = await anonymousClient().fetch(link.pathname + link.search);
    expect(signInPage.status).toBe(200);
    expect(signInPage.headers.get('referrer-policy')).toBe('same-origin');
    const { token } = await invitationToken();
    const invitePage = await anonymousClient().fetch(`/invite/${token}`);
    expect(invitePage.status).toBe(200);
    expect(invitePage.headers.get('referrer-policy')).toBe('same-origin');
  });
});

describe('a homeowner sign-in link posted with Origin: null', () => {
  it('signs in when the browser says the post is same-origin', async () => {
    const link = new URL(await requestHomeownerLink(org.homeowner.email));
    const client = anonymousClient();
    expect((await client.fetch(link.pathname + link.search)).status).toBe(200);
    const res = await postCredentials(
      client,
      'email-link',
      { token: link.searchParams.get('token') ?? '', callbackUrl: '/' },
      { ...browserForm, ...opaqueSameOrigin },
    );
    expect([302, 303], await res.clone().text()).toContain(res.status);
    expect(new URL(res.headers.get('location') ?? '', 'http://x').pathname).toBe('/');
    expect(hasSession(client)).toBe(true);
  });

  it('is refused with a readable page when the post is cross-site, and the link stays usable', async () => {
    const link = new URL(await requestHomeownerLink(org.homeowner.email));
    const token = link.searchParams.get('token') ?? '';
    const refused: Record<string, string>[] = [
      { origin: 'null', 'sec-fetch-site': 'cross-site' },
      { origin: 'null', 'sec-fetch-site': 'same-site' },
      { origin: 'null' },
      { origin: 'https://elsewhere.test', 'sec-fetch-site': 'same-origin' },
    ];
    for (const headers of refused) {
      const client = anonymousClient();
      const res = await postCredentials(
        client,
        'email-link',
        { token, callbackUrl: '/' },
        { ...browserForm, ...headers },
      );
      expect(res.status, JSON.stringify(headers)).toBe(403);
      expect(res.headers.get('content-type')).toMatch(/^text\/html/);
      const page = await res.text();
      expect(page).toContain('<h1');
      expect(page).toMatch(/another site/i);
      expect(page).toMatch(/href="http:\/\/[^"]+\/signin"/);
      expect(hasSession(client)).toBe(false);
    }
    const client = anonymousClient();
    await postCredentials(client, 'email-link', { token, callbackUrl: '/' });
    expect(hasSession(client)).toBe(true);
  });
});

describe('an invitation accepted with Origin: null', () => {
  it('creates the account when the browser says the post is same-origin', async () => {
    const { email, token } = await invitationToken();
    const res = await acceptForm(anonymousClient(), token, opaqueSameOrigin);
    expect(res.status, await res.clone().text()).toBe(303);
    expect(res.headers.get('location')).toBe('/signin?invited');
    const user = await testDb()('users')
      .whereRaw('email = ?::citext', [email])
      .first('organisation_id', 'role', 'name');
    expect(user).toEqual({ organisation_id: org.id, role: 'auditor', name: 'Tamsin Orrery' });
    expect((await signIn(email, 'orrery-tamsin-pass')).cookie).toBeTruthy();
  });

  it('is refused when cross-site, and the invitation stays open', async () => {
    const { email, token } = await invitationToken();
    const refused: Record<string, string>[] = [
      { origin: 'null', 'sec-fetch-site': 'cross-site' },
      { origin: 'https://elsewhere.test' },
      { origin: 'null' },
    ];
    for (const headers of refused) {
      const res = await acceptForm(anonymousClient(), token, headers);
      expect(res.status, JSON.stringify(headers)).toBe(403);
      expect(res.headers.get('content-type')).toMatch(/^text\/html/);
      expect(await res.text()).toMatch(/another site/i);
    }
    expect(await testDb()('users').whereRaw('email = ?::citext', [email]).first('id')).toBeUndefined();
    expect(
      await testDb()('invitations')
        .whereRaw('email = ?::citext', [email])
        .whereNull('accepted_at')
        .whereNull('revoked_at')
        .first('id'),
    ).toBeTruthy();
  });
});

describe('an API write', () => {
  it('is refused with problem+json when Sec-Fetch-Site says cross-site, whatever Origin claims', async () => {
    const refused: Record<string, string>[] = [
      { 'sec-fetch-site': 'cross-site' },
      { origin: 'null', 'sec-fetch-site': 'cross-site' },
      { origin: 'https://elsewhere.test', 'sec-fetch-site': 'same-origin' },
    ];
    for (const headers of refused) {
      const res = await owner.fetch('/api/organisation', {
        method: 'PATCH',
        headers: { 'content-type': 'application/json', accept: 'application/json', ...headers },
        body: JSON.stringify({ name: 'Taken over' }),
      });
      expect(res.status, JSON.stringify(headers)).toBe(403);
      expect(res.headers.get('content-type')).toContain('application/problem+json');
      expect((await res.json()).status).toBe(403);
    }
    expect((await testDb()('organisations').where({ id: org.id }).first('name')).name).toBe(org.name);
  });

  it('passes with Origin: null and Sec-Fetch-Site same-origin', async () => {
    const res = await owner.fetch('/api/organisation', {
      method: 'PATCH',
      headers: { 'content-type': 'application/json', accept: 'application/json', ...opaqueSameOrigin },
      body: JSON.stringify({ reinspectionMonths: 24 }),
    });
    expect(res.status, await res.clone().text()).toBe(200);
  });
});
