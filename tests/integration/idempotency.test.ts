/**
 * Idempotency-Key on creates, over HTTP against the real database: a retry with the same key
 * answers the first response and creates nothing more, also when the copies arrive at once; the
 * same key with another body is refused naming the header; keys belong to one user and expire.
 * Uploads from the walk-through take the key as the file's device id.
 */
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  closeTestDb,
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import {
  currentVersion,
  insertDraft,
  publishedFamilies,
  seedDirectory,
  type Directory,
} from './support/domain';

let org: FixtureOrganisation;
let dir: Directory;
let family: string;
let office: TestClient;
let auditor: TestClient;

beforeAll(async () => {
  org = await createOrganisation('idempotency');
  dir = await seedDirectory(org);
  [family] = (await publishedFamilies()) as [string];
  [office, auditor] = await Promise.all([
    signIn(org.office.email, fixturePassword),
    signIn(org.auditor.email, fixturePassword),
  ]);
});
afterAll(async () => {
  await closeTestDb();
});

function post(client: TestClient, path: string, body: unknown, key?: string) {
  const headers: Record<string, string> = { accept: 'application/json', 'content-type': 'application/json' };
  if (key !== undefined) headers['idempotency-key'] = key;
  return client.fetch(path, { method: 'POST', headers, body: JSON.stringify(body) });
}

const countClients = async (name: string) =>
  Number((await testDb()('clients').where({ organisation_id: org.id, name }).count({ n: '*' }))[0]?.n);

describe('Idempotency-Key on POST /api/clients', () => {
  it('answers a retry with the first response (same status and body, marked as a replay) and creates one row', async () => {
    const name = `Retry Client ${randomUUID()}`;
    const key = randomUUID();
    const first = await post(office, '/api/clients', { name, kind: 'business' }, key);
    expect(first.status).toBe(201);
    expect(first.headers.get('idempotent-replayed')).toBeNull();
    const firstBody = await first.text();
    const again = await post(office, '/api/clients', { name, kind: 'business' }, key);
    expect(again.status).toBe(201);
    expect(again.headers.get('idempotent-replayed')).toBe('true');
    expect(again.headers.get('location')).toBe(first.headers.get('location'));
    expect(await again.text()).toBe(firstBody);
    expect(await countClients(name)).toBe(1);
  });

  it('creates one row when copies with one key arrive at the same time', async () => {
    const name = `Concurrent Client ${randomUUID()}`;
    const key = randomUUID();
    const answers = await Promise.all(
      Array.from({ length: 6 }, () => post(office, '/api/clients', { name, kind: 'business' }, key)),
    );
    expect(answers.map((a) => a.status)).toEqual(Array(6).fill(201));
    const ids = new Set(await Promise.all(answers.map(async (a) => (await a.json()).id)));
    expect(ids.size).toBe(1);
    expect(answers.filter((a) => a.headers.get('idempotent-replayed') === 'true')).toHaveLength(5);
    expect(await countClients(name)).toBe(1);
  });

  it('refuses the same key with a different body with 422 naming the header, and creates nothing', async () => {
    const key = randomUUID();
    const name = `Body A ${randomUUID()}`;
    expect((await post(office, '/api/clients', { name, kind: 'business' }, key)).status).toBe(201);
    const other = `Body B ${randomUUID()}`;
    const res = await post(office, '/api/clients', { name: other, kind: 'business' }, key);
    expect(res.status).toBe(422);
    expect(res.headers.get('content-type')).toMatch(/problem\+json/);
    expect((await res.json()).errors).toEqual([expect.objectContaining({ field: 'Idempotency-Key' })]);
    expect(await countClients(other)).toBe(0);
  });

  it('refuses the same key on another route (the path is part of the request)', async () => {
    const key = randomUUID();
    expect(
      (await post(office, '/api/clients', { name: `Path ${randomUUID()}`, kind: 'business' }, key)).status,
    ).toBe(201);
    const before = await testDb()('sites').where({ organisation_id: org.id }).count({ n: '*' });
    const res = await post(
      office,
      '/api/sites',
      { clientId: dir.clientId, addressLine1: '2 Key Lane', city: 'Eastholm', usageClass: 1 },
      key,
    );
    expect(res.status).toBe(422);
    expect(await testDb()('sites').where({ organisation_id: org.id }).count({ n: '*' })).toEqual(before);
  });

  it('keeps keys apart per user: the same key from a colleague is a new request', async () => {
    const key = randomUUID();
    const name = `Per User ${randomUUID()}`;
    expect((await post(office, '/api/clients', { name, kind: 'business' }, key)).status).toBe(201);
    const theirs = await post(auditor, '/api/clients', { name, kind: 'business' }, key);
    expect(theirs.status).toBe(201);
    expect(theirs.headers.get('idempotent-replayed')).toBeNull();
    expect(await countClients(name)).toBe(2);
  });

  it('forgets a key once it has expired', async () => {
    const key = randomUUID();
    const name = `Expired ${randomUUID()}`;
    expect((await post(office, '/api/clients', { name, kind: 'business' }, key)).status).toBe(201);
    const stored = await testDb()('idempotency_keys')
      .where({ user_id: org.office.id, key })
      .first('expires_at', 'created_at');
    expect(new Date(stored.expires_at).getTime() - new Date(stored.created_at).getTime()).toBe(24 * 3600_000);
    await testDb()('idempotency_keys')
      .where({ user_id: org.office.id, key })
      .update({ expires_at: testDb().raw("now() - interval '1 second'") });
    const again = await post(office, '/api/clients', { name, kind: 'business' }, key);
    expect(again.status).toBe(201);
    expect(again.headers.get('idempotent-replayed')).toBeNull();
    expect(await countClients(name)).toBe(2);
  });

  it('does not keep a refused request: the same key with a corrected body then creates', async () => {
    const key = randomUUID();
    const name = `Corrected ${randomUUID()}`;
    const refused = await post(office, '/api/clients', { name, kind: 'not-a-kind' }, key);
    expect(refused.status).toBe(422);
    expect((await refused.json()).errors.map((e: { field: string }) => e.field)).toEqual(['kind']);
    expect((await post(office, '/api/clients', { name, kind: 'business' }, key)).status).toBe(201);
    expect(await countClients(name)).toBe(1);
  });

  it('refuses a malformed key with 400 naming the header', async () => {
    for (const key of ['x'.repeat(256), 'has space']) {
      const res = await post(
        office,
        '/api/clients',
        { name: `Bad Key ${randomUUID()}`, kind: 'business' },
        key,
      );
      expect(res.status).toBe(400);
      expect((await res.json()).errors).toEqual([expect.objectContaining({ field: 'Idempotency-Key' })]);
    }
  });
});

describe('Idempotency-Key on the other creates', () => {
  const cases = [
    {
      path: '/api/sites',
      table: 'sites',
      body: () => ({
        clientId: dir.clientId,
        addressLine1: `${randomUUID().slice(0, 8)} Retry Road`,
        city: 'Eastholm',
        usageClass: 1,
      }),
    },
    {
      path: '/api/gates',
      table: 'gates',
      body: () => ({
        siteId: dir.siteId,
        label: `Retry gate ${randomUUID().slice(0, 8)}`,
        kind: 'slide',
        leaves: 'single',
      }),
    },
    {
      path: '/api/assessments',
      table: 'assessments',
      body: () => ({ gateId: dir.gateId, family, purpose: 'inspection' }),
    },
  ] as const;
  for (const c of cases) {
    it(`${c.path}: concurrent copies and a later retry create one row`, async () => {
      const key = randomUUID();
      const body = c.body();
      const count = async () =>
        Number((await testDb()(c.table).where({ organisation_id: org.id }).count({ n: '*' }))[0]?.n);
      const before = await count();
      const answers = await Promise.all([
        post(auditor, c.path, body, key),
        post(auditor, c.path, body, key),
        post(auditor, c.path, body, key),
      ]);
      expect(answers.map((a) => a.status)).toEqual([201, 201, 201]);
      const retry = await post(auditor, c.path, body, key);
      expect(retry.status).toBe(201);
      expect(retry.headers.get('idempotent-replayed')).toBe('true');
      const ids = new Set(await Promise.all([...answers, retry].map(async (a) => (await a.json()).id)));
      expect(ids.size).toBe(1);
      expect(await count()).toBe(before + 1);
    });
  }
});

describe('uploads take the key as the device id of the file', () => {
  const csv = [
    'time (s),force (N)',
    ...Array.from(
      { length: 3001 },
      (_, i) =>
        `${(i / 500).toFixed(3)},${(i < 200 ? i * 1.4 : Math.max(20, 280 - (i - 200) * 0.8)).toFixed(1)}`,
    ),
  ].join('\n');
  const query = 'itemKey=forceTest&location=closing_edge&direction=closing&gapMm=50';
  const upload = (draftId: string, key: string, extra = '') =>
    auditor.fetch(`/api/assessments/${draftId}/force-traces?${query}${extra}`, {
      method: 'POST',
      headers: { 'content-type': 'text/csv', 'idempotency-key': key },
      body: csv,
    });

  it('stores one force trace for a retried upload and marks the replay', async () => {
    const version = await currentVersion(family);
    const draftId = await insertDraft(org.id, dir.gateId, org.auditor.id, version.id);
    const key = randomUUID();
    const first = await upload(draftId, key);
    expect(first.status, await first.clone().text()).toBe(201);
    const again = await upload(draftId, key);
    expect(again.status).toBe(200);
    expect(again.headers.get('idempotent-replayed')).toBe('true');
    expect((await again.json()).id).toBe((await first.json()).id);
    expect(await testDb()('force_traces').where({ assessment_id: draftId }).select('client_ref')).toEqual([
      { client_ref: key },
    ]);
  });

  it('refuses a key that names another file than clientRef, storing nothing', async () => {
    const version = await currentVersion(family);
    const draftId = await insertDraft(org.id, dir.gateId, org.auditor.id, version.id);
    const res = await upload(draftId, randomUUID(), `&clientRef=${randomUUID()}`);
    expect(res.status).toBe(422);
    expect((await res.json()).errors).toEqual([expect.objectContaining({ field: 'Idempotency-Key' })]);
    const notUuid = await upload(draftId, 'retry-1');
    expect(notUuid.status).toBe(400);
    expect((await notUuid.json()).errors).toEqual([expect.objectContaining({ field: 'Idempotency-Key' })]);
    expect(await testDb()('force_traces').where({ assessment_id: draftId }).count({ n: '*' })).toEqual([
      { n: '0' },
    ]);
  });
});
