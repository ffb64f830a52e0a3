import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import {
  closeTestDb,
  createOrganisation,
  fixturePassword,
  hasSession,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { rawRequest } from './support/raw-http';

const baseUrl = inject('baseUrl');
let org: FixtureOrganisation;
let owner: TestClient;
beforeAll(async () => {
  org = await createOrganisation('guard');
  owner = await signIn(org.owner.email, fixturePassword);
});
afterAll(async () => {
  await closeTestDb();
});

describe('signed-out callers', () => {
  const apiVariants = [
    '/api/users',
    '/api/users/',
    '/api//users',
    '/API/users',
    '/Api/Users',
    '/%61pi/users',
    '/api/%75sers',
    '/%2561pi/users',
    '/api/health/../users',
    '/api/health/%2e%2e/users',
    '/api/organisation',
    `/api/users/${'0'.repeat(8)}-0000-0000-0000-000000000000`,
    '/api/clients',
    '/api/no-such-route',
  ];
  for (const path of apiVariants) {
    it(`get 401 problem+json from ${path}`, async () => {
      const res = await fetch(`${baseUrl}${path}`, { redirect: 'manual' });
      expect(res.status).toBe(401);
      expect(res.headers.get('content-type')).toContain('application/problem+json');
      const body = await res.json();
      expect(body.status).toBe(401);
      expect(body.title).toBeTruthy();
    });
  }

  it('still reach the public API routes', async () => {
    expect((await fetch(`${baseUrl}/api/health`)).status).toBe(200);
    expect((await fetch(`${baseUrl}/api/auth/csrf`)).status).toBe(200);
  });

  const pageVariants = [
    '/staff',
    '/settings',
    '/assessments',
    '/clients/',
    '/CLIENTS',
    '/%73taff',
    '/archive//x',
    '/gates/123',
    '/walk/abc',
  ];
  for (const path of pageVariants) {
    it(`are sent to sign-in from ${path}, with where they were going`, async () => {
      const res = await fetch(`${baseUrl}${path}`, { redirect: 'manual' });
      expect(res.status).toBe(302);
      const location = new URL(res.headers.get('location') ?? '', baseUrl);
      expect(location.pathname).toBe('/signin');
      expect(location.searchParams.get('next')).toBe(decodeURIComponent(path));
    });
  }

  it('can open the public pages', async () => {
    for (const path of ['/', '/signin'])
      expect((await fetch(`${baseUrl}${path}`, { redirect: 'manual' })).status, path).toBe(200);
  });

  it('get the security headers on every answer', async () => {
    for (const path of ['/', '/signin', '/api/health', '/api/users']) {
      const res = await fetch(`${baseUrl}${path}`, { redirect: 'manual' });
      expect(res.headers.get('x-content-type-options'), path).toBe('nosniff');
      expect(res.headers.get('referrer-policy'), path).toBeTruthy();
      expect(res.headers.get('content-security-policy'), path).toContain("frame-ancestors 'none'");
    }
  });
});

describe('cross-site writes', () => {
  it('refuse a JSON PATCH whose Origin is another site, changing nothing', async () => {
    const res = await owner.fetch('/api/organisation', {
      method: 'PATCH',
      headers: { origin: 'https://elsewhere.test', 'content-type': 'application/json' },
      body: JSON.stringify({ name: 'Taken over' }),
    });
    expect(res.status).toBe(403);
    expect(res.headers.get('content-type')).toContain('application/problem+json');
    const row = await testDb()('organisations').where({ id: org.id }).first('name');
    expect(row.name).toBe(org.name);
  });

  it('refuse a write whose only Referer is another site', async () => {
    const headers = new Headers({
      referer: 'https://elsewhere.test/page',
      'content-type': 'application/json',
    });
    const res = await fetch(`${baseUrl}/api/organisation`, {
      method: 'PATCH',
      headers: { ...Object.fromEntries(headers), cookie: owner.cookie },
      body: JSON.stringify({ name: 'Taken over' }),
    });
    expect(res.status).toBe(403);
  });

  it('refuse an opaque (null) Origin', async () => {
    const res = await owner.fetch('/api/organisation', {
      method: 'PATCH',
      headers: { origin: 'null', 'content-type': 'application/json' },
      body: JSON.stringify({ name: 'Taken over' }),
    });
    expect(res.status).toBe(403);
  });

  it('answer a refused browser form post with a page naming the configured address', async () => {
    // Opened at another name for the same machine, the page says where Latchwell really is.
    const res = await owner.fetch('/auth/signout', {
      method: 'POST',
      headers: {
        origin: 'http://localhost:9',
        accept: 'text/html',
        'content-type': 'application/x-www-form-urlencoded',
      },
      body: '',
    });
    expect(res.status).toBe(403);
    expect(res.headers.get('content-type')).toContain('text/html');
    const page = await res.text();
    const origin = new URL(baseUrl).origin;
    expect(page).toContain(`<a href="${origin}/signin">Sign in</a>`);
    expect(page).not.toContain('localhost');
  });

  it('refuse a cross-site form post to sign out', async () => {
    const res = await owner.fetch('/auth/signout', {
      method: 'POST',
      headers: { origin: 'https://elsewhere.test', 'content-type': 'application/x-www-form-urlencoded' },
      body: '',
    });
    expect(res.status).toBe(403);
    expect(hasSession(owner)).toBe(true);
    expect((await owner.json('GET', '/api/organisation')).status).toBe(200);
  });

  // The same-site check compares Origin with the configured public address only: Host and
  // X-Forwarded-* are written by whoever sends the request (or a DNS name pointed at the server).
  const forgedHosts: { name: string; origin: string; headers: Record<string, string> }[] = [
    { name: 'Host', origin: 'http://attacker.example', headers: { host: 'attacker.example' } },
    {
      name: 'X-Forwarded-Host',
      origin: 'http://attacker.example',
      headers: { 'x-forwarded-host': 'attacker.example' },
    },
    {
      name: 'X-Forwarded-Proto and X-Forwarded-Host',
      origin: 'https://attacker.example:8443',
      headers: { 'x-forwarded-proto': 'https', 'x-forwarded-host': 'attacker.example:8443' },
    },
  ];
  for (const forged of forgedHosts) {
    it(`refuse a write whose Origin matches a forged ${forged.name}, changing nothing`, async () => {
      const res = await rawRequest(`${baseUrl}/api/organisation`, {
        method: 'PATCH',
        headers: {
          ...forged.headers,
          origin: forged.origin,
          cookie: owner.cookie,
          'content-type': 'application/json',
          accept: 'application/json',
        },
        body: JSON.stringify({ name: 'Taken over' }),
      });
      expect(res.status).toBe(403);
      expect(res.json().detail).toBe('Requests from another site are refused.');
      const row = await testDb()('organisations').where({ id: org.id }).first('name');
      expect(row.name).toBe(org.name);
      // The same forged headers with the configured public address as Origin pass.
      const own = await rawRequest(`${baseUrl}/api/organisation`, {
        method: 'PATCH',
        headers: {
          ...forged.headers,
          origin: inject('serverEnv').PUBLIC_URL,
          cookie: owner.cookie,
          'content-type': 'application/json',
        },
        body: JSON.stringify({ reinspectionMonths: 19 }),
      });
      expect(own.status).toBe(200);
      expect(own.json().reinspectionMonths).toBe(19);
    });
  }

  it('refuse a sign-in form posted from a forged Host', async () => {
    const res = await rawRequest(`${baseUrl}/api/auth/callback/credentials`, {
      method: 'POST',
      headers: {
        host: 'attacker.example',
        origin: 'http://attacker.example',
        'content-type': 'application/x-www-form-urlencoded',
      },
      body: new URLSearchParams({ email: org.owner.email, password: fixturePassword }).toString(),
    });
    expect(res.status).toBe(403);
    expect(res.json().detail).toBe('Requests from another site are refused.');
  });

  it('allow the same write from the site itself', async () => {
    const res = await owner.json('PATCH', '/api/organisation', { reinspectionMonths: 18 });
    expect(res.status).toBe(200);
    expect((await res.json()).reinspectionMonths).toBe(18);
  });
});

describe('sessions follow the user row', () => {
  it("end a deactivated user's existing session at once", async () => {
    const fresh = await createOrganisation('deactivate');
    const freshOwner = await signIn(fresh.owner.email, fixturePassword);
    const auditor = await signIn(fresh.auditor.email, fixturePassword);
    expect((await auditor.json('GET', '/api/organisation')).status).toBe(200);
    expect((await freshOwner.json('PATCH', `/api/users/${fresh.auditor.id}`, { active: false })).status).toBe(
      200,
    );
    expect((await auditor.json('GET', '/api/organisation')).status).toBe(401);
    expect((await auditor.fetch('/staff')).status).toBe(302);
    // and they cannot sign in again while switched off
    await expect(signIn(fresh.auditor.email, fixturePassword)).rejects.toThrow(/401/);
    // reactivation lets them sign in afresh, but the old session stays ended
    expect((await freshOwner.json('PATCH', `/api/users/${fresh.auditor.id}`, { active: true })).status).toBe(
      200,
    );
    expect((await auditor.json('GET', '/api/organisation')).status).toBe(401);
    const again = await signIn(fresh.auditor.email, fixturePassword);
    expect((await again.json('GET', '/api/organisation')).status).toBe(200);
  });

  it('apply a role change on the next request', async () => {
    const fresh = await createOrganisation('role-change');
    const freshOwner = await signIn(fresh.owner.email, fixturePassword);
    const office = await signIn(fresh.office.email, fixturePassword);
    expect((await office.json('GET', '/api/users')).status).toBe(200);
    const res = await freshOwner.json('PATCH', `/api/users/${fresh.office.id}`, { role: 'auditor' });
    expect(res.status).toBe(200);
    expect((await res.json()).role).toBe('auditor');
    // the old session no longer holds; signed in again, they have the new role's rights only
    expect((await office.json('GET', '/api/users')).status).toBe(401);
    const asAuditor = await signIn(fresh.office.email, fixturePassword);
    expect((await asAuditor.json('GET', '/api/users')).status).toBe(403);
    expect((await asAuditor.json('GET', '/api/organisation')).status).toBe(200);
  });

  it('refuse a forged session cookie', async () => {
    const res = await fetch(`${baseUrl}/api/organisation`, {
      headers: { cookie: 'authjs.session-token=not-a-real-token' },
    });
    expect(res.status).toBe(401);
  });
});

describe('signing out', () => {
  it('ends the session through the navigation button and records it', async () => {
    const fresh = await createOrganisation('sign-out');
    const office = await signIn(fresh.office.email, fixturePassword);
    const res = await office.fetch('/auth/signout', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: '',
    });
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe('/signin?signedOut=1');
    expect(hasSession(office)).toBe(false);
    expect((await office.json('GET', '/api/organisation')).status).toBe(401);
    const events = await testDb()('audit_events')
      .where({ organisation_id: fresh.id, action: 'sign_out' })
      .select('entity_id');
    expect(events.map((e) => e.entity_id)).toEqual([fresh.office.id]);
  });

  it("ends the session through auth core's own sign-out endpoint too", async () => {
    const fresh = await createOrganisation('sign-out-core');
    const auditor = await signIn(fresh.auditor.email, fixturePassword);
    const { csrfToken } = await (await auditor.fetch('/api/auth/csrf')).json();
    const res = await auditor.fetch('/api/auth/signout', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ csrfToken }),
    });
    expect(res.status).toBeGreaterThanOrEqual(300);
    expect(hasSession(auditor)).toBe(false);
    const events = await testDb()('audit_events')
      .where({ organisation_id: fresh.id, action: 'sign_out' })
      .count({ n: '*' });
    expect(Number(events[0].n)).toBe(1);
  });
});

describe('another organisation', () => {
  it("answers 404 for another organisation's user id, to read or change", async () => {
    const other = await createOrganisation('other-org');
    expect((await owner.json('GET', `/api/users/${other.auditor.id}`)).status).toBe(404);
    const patch = await owner.json('PATCH', `/api/users/${other.auditor.id}`, { active: false });
    expect(patch.status).toBe(404);
    const row = await testDb()('users').where({ id: other.auditor.id }).first('active', 'session_version');
    expect(row).toEqual({ active: true, session_version: 1 });
    // the same call on one's own organisation's user works, so the 404 is about ownership
    expect((await owner.json('GET', `/api/users/${org.auditor.id}`)).status).toBe(200);
  });

  it("never lists another organisation's people", async () => {
    await createOrganisation('other-list');
    const res = await owner.json('GET', '/api/users?pageSize=100');
    const body = await res.json();
    expect(body.total).toBe(5);
    expect(body.items.every((u: { email: string }) => u.email.includes(org.slug))).toBe(true);
  });
});
