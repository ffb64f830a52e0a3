/**
 * What a signed-in request costs the database, counted by the server under test
 * (QUERY_COUNT_HEADER=1 makes it answer `x-query-count`): a session whose check is fresh is not
 * looked up again, a list page does not ask once per row, and every way of ending a session
 * still ends it on this instance at once, warm check or not. A change made behind this
 * instance's back (another instance, SQL by hand) is seen within SESSION_RECHECK_MS.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import {
  closeTestDb,
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { currentVersion, insertDraft, seedDirectory } from './support/domain';

const baseUrl = inject('baseUrl');
const serverEnv = inject('serverEnv') as Record<string, string>;
// The server's setting, or its default (src/lib/server/auth/session-cache.ts).
const recheckMs = Number(serverEnv.SESSION_RECHECK_MS ?? 5000);

let org: FixtureOrganisation;
beforeAll(async () => {
  org = await createOrganisation('session-cost');
});
afterAll(async () => {
  await closeTestDb();
});

async function queriesFor(client: TestClient, path: string): Promise<{ status: number; queries: number }> {
  const res = await client.fetch(path, { headers: { accept: 'application/json' } });
  await res.arrayBuffer();
  const header = res.headers.get('x-query-count');
  expect(header, `x-query-count on ${path}`).toMatch(/^\d+$/);
  return { status: res.status, queries: Number(header) };
}

/** A request with only the given cookie, as someone who copied it would send. */
function withCookie(cookie: string, path: string) {
  return fetch(`${baseUrl}${path}`, { headers: { cookie, accept: 'application/json' }, redirect: 'manual' });
}

/** Asks until the answer is 401 or the time is up; returns how long that took. */
async function msUntilRefused(cookie: string, withinMs: number): Promise<number> {
  const started = Date.now();
  for (;;) {
    const status = (await withCookie(cookie, '/api/organisation')).status;
    if (status === 401) return Date.now() - started;
    expect(status).toBe(200);
    if (Date.now() - started > withinMs) return Infinity;
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe('the cost of a signed-in request', () => {
  it('does not look the session up again while its check is fresh', async () => {
    const office = await signIn(org.office.email, fixturePassword);
    // An /api path with no route: the middleware runs, no handler asks anything.
    const first = await queriesFor(office, '/api/no-such-route');
    expect(first.status).toBe(404);
    expect(first.queries).toBeLessThanOrEqual(1);
    const again = await queriesFor(office, '/api/no-such-route');
    expect(again).toEqual({ status: 404, queries: 0 });
    // Signed out, the same path asks nothing either (and is refused).
    const anonymous = await fetch(`${baseUrl}/api/no-such-route`, {
      headers: { accept: 'application/json' },
    });
    expect(anonymous.status).toBe(401);
    expect(anonymous.headers.get('x-query-count')).toBe('0');
  });

  it('reads an assessment in one statement and lists a page with its total in one, however many rows there are', async () => {
    const fresh = await createOrganisation('session-cost-list');
    const dir = await seedDirectory(fresh);
    const version = await currentVersion('north-american-gate');
    const ids: string[] = [];
    for (let i = 0; i < 6; i++)
      ids.push(
        await insertDraft(fresh.id, i % 2 ? dir.gateId : dir.homeGateId, fresh.auditor.id, version.id),
      );
    const office = await signIn(fresh.office.email, fixturePassword);
    await queriesFor(office, '/api/no-such-route'); // the session check, out of the way

    const one = await queriesFor(office, `/api/assessments/${ids[0]}`);
    expect(one).toEqual({ status: 200, queries: 1 });
    const small = await queriesFor(office, '/api/assessments?pageSize=2');
    const large = await queriesFor(office, '/api/assessments?pageSize=25');
    expect(small).toEqual({ status: 200, queries: 1 });
    expect(large).toEqual({ status: 200, queries: 1 });
    const body = await (await office.fetch('/api/assessments?pageSize=25')).json();
    expect(body.items).toHaveLength(6);
    expect(body.total).toBe(6);
    // The total of every page, the last (partial) one and one past the end (which asks apart) too.
    const pages = [];
    for (const page of [1, 2, 3]) {
      const res = await office.fetch(`/api/assessments?pageSize=4&page=${page}`, {
        headers: { accept: 'application/json' },
      });
      const { items, total } = await res.json();
      pages.push({ items: items.length, total, queries: Number(res.headers.get('x-query-count')) });
    }
    expect(pages).toEqual([
      { items: 4, total: 6, queries: 1 },
      { items: 2, total: 6, queries: 1 },
      { items: 0, total: 6, queries: 2 },
    ]);
    const none = await office.fetch('/api/assessments?status=signed', {
      headers: { accept: 'application/json' },
    });
    expect(await none.json()).toMatchObject({ items: [], total: 0 });
    expect(none.headers.get('x-query-count')).toBe('1');
  });
});

describe('the cost of an autosave', () => {
  it('saves a draft this instance saved last in one statement and answers it as GET shows it; a stale save changes nothing', async () => {
    const fresh = await createOrganisation('session-cost-save');
    const dir = await seedDirectory(fresh);
    const version = await currentVersion('north-american-gate');
    const id = await insertDraft(fresh.id, dir.gateId, fresh.auditor.id, version.id);
    const auditor = await signIn(fresh.auditor.email, fixturePassword);
    await queriesFor(auditor, '/api/no-such-route'); // the session check, out of the way
    const save = (rowVersion: number, note: string) =>
      auditor.fetch(`/api/assessments/${id}`, {
        method: 'PATCH',
        headers: {
          'content-type': 'application/merge-patch+json',
          accept: 'application/json',
          'if-match': `"${rowVersion}"`,
        },
        body: JSON.stringify({ answers: { latchFitted: { value: 'no', note } } }),
      });
    // The first save may load the pinned version into the process's cache; it reads the draft
    // (1) and saves it (2).
    const first = await save(1, 'first');
    expect(first.status).toBe(200);
    expect(Number(first.headers.get('x-query-count'))).toBeGreaterThanOrEqual(2);

    const second = await save(2, 'second');
    const saved = await second.json();
    expect(second.status).toBe(200);
    // This instance saved version 2: one conditional update naming the row's xmin.
    expect(second.headers.get('x-query-count')).toBe('1');
    expect(second.headers.get('etag')).toBe('"3"');
    expect(saved.rowVersion).toBe(3);
    expect(saved.answers).toEqual({ latchFitted: { value: 'no', note: 'second' } });
    const read = await auditor.fetch(`/api/assessments/${id}`, { headers: { accept: 'application/json' } });
    expect(read.headers.get('etag')).toBe('"3"');
    expect(await read.json()).toEqual(saved);

    const stale = await save(2, 'stale');
    expect(stale.status).toBe(409);
    expect((await stale.json()).current).toEqual(saved);
    const row = await testDb()('assessments').where({ id }).first('row_version', 'answers');
    expect(row).toEqual({ row_version: 3, answers: { latchFitted: { value: 'no', note: 'second' } } });
  });
});

describe('ending a session with its check warm', () => {
  it('signing out refuses a copied cookie on the very next request', async () => {
    const fresh = await createOrganisation('session-cost-signout');
    const laptop = await signIn(fresh.owner.email, fixturePassword);
    const copied = laptop.cookie;
    for (let i = 0; i < 3; i++) expect((await withCookie(copied, '/api/organisation')).status).toBe(200);
    const out = await laptop.fetch('/auth/signout', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: '',
    });
    expect(out.status).toBe(303);
    expect((await withCookie(copied, '/api/organisation')).status).toBe(401);
  });

  it('a role change and a deactivation through this instance end the person’s sessions at once', async () => {
    const fresh = await createOrganisation('session-cost-roles');
    const owner = await signIn(fresh.owner.email, fixturePassword);
    const auditor = await signIn(fresh.auditor.email, fixturePassword);
    const auditor2 = await signIn(fresh.auditor2.email, fixturePassword);
    expect((await auditor.json('GET', '/api/organisation')).status).toBe(200);
    expect((await auditor2.json('GET', '/api/organisation')).status).toBe(200);
    expect((await owner.json('PATCH', `/api/users/${fresh.auditor.id}`, { role: 'office' })).status).toBe(
      200,
    );
    expect((await withCookie(auditor.cookie, '/api/organisation')).status).toBe(401);
    expect((await owner.json('PATCH', `/api/users/${fresh.auditor2.id}`, { active: false })).status).toBe(
      200,
    );
    expect((await withCookie(auditor2.cookie, '/api/organisation')).status).toBe(401);
  });

  it('an organisation setting changed through this instance shows on the next request', async () => {
    const fresh = await createOrganisation('session-cost-settings');
    const owner = await signIn(fresh.owner.email, fixturePassword);
    const office = await signIn(fresh.office.email, fixturePassword);
    const before = await (await office.json('GET', '/api/organisation')).json();
    const months = before.reinspectionMonths === 6 ? 7 : 6;
    expect(
      (await owner.json('PATCH', '/api/organisation', { reinspectionMonths: months })).status,
    ).toBeLessThan(300);
    const read = await (await office.fetch('/api/archive/reinspection?within=60')).json();
    expect(read.reinspectionMonths).toBe(months);
  });

  it(
    'a deactivation or password change made behind this instance’s back ends the session within SESSION_RECHECK_MS',
    async () => {
      const fresh = await createOrganisation('session-cost-elsewhere');
      const office = await signIn(fresh.office.email, fixturePassword);
      const owner = await signIn(fresh.owner.email, fixturePassword);
      expect((await withCookie(office.cookie, '/api/organisation')).status).toBe(200);
      expect((await withCookie(owner.cookie, '/api/organisation')).status).toBe(200);

      // What another instance's deactivation writes, written here directly.
      await testDb()('users').where({ id: fresh.owner.id }).update({ active: false });
      const ownerMs = await msUntilRefused(owner.cookie, recheckMs + 2000);
      // Another instance's bump of session_version (password change elsewhere).
      await testDb()('users')
        .where({ id: fresh.office.id })
        .update({ session_version: testDb().raw('session_version + 1') });
      const officeMs = await msUntilRefused(office.cookie, recheckMs + 2000);
      // Bounded by the recheck interval plus the poll's own step, never longer.
      expect(ownerMs).toBeLessThanOrEqual(recheckMs + 1000);
      expect(officeMs).toBeLessThanOrEqual(recheckMs + 1000);
    },
    4 * 60_000,
  );
});
