/**
 * Hostile input, generated: random and malformed bodies to every write endpoint and random
 * files to every upload must get a 4xx (never a 5xx) and leave the database as it was.
 * Property-based with fast-check; runs are bounded so the suite stays lean.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  createOrganisation,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { currentVersion, insertDraft, seedDirectory, snapshotTables, type Directory } from './support/domain';

let org: FixtureOrganisation;
let owner: TestClient;
let dir: Directory;
let draftId: string;

beforeAll(async () => {
  org = await createOrganisation('hostile');
  owner = await signIn(org.owner.email, org.owner.password!);
  dir = await seedDirectory(org);
  const version = await currentVersion('north-american-gate');
  draftId = await insertDraft(org.id, dir.gateId, org.auditor.id, version.id);
});

/** Organisation-scoped tables plus the ones write endpoints touch, for before/after comparison. */
async function snapshot() {
  const base = await snapshotTables(org.id);
  const extra: Record<string, unknown> = {};
  for (const table of ['users', 'ruleset_versions', 'outbox_messages']) {
    extra[table] =
      table === 'ruleset_versions'
        ? await testDb()('ruleset_versions as rv')
            .join('rulesets as r', 'r.id', 'rv.ruleset_id')
            .where('r.organisation_id', org.id)
            .orderBy('rv.id')
            .select('rv.*')
        : await testDb()(table).where({ organisation_id: org.id }).orderBy('id').select('*');
  }
  extra.organisation = await testDb()('organisations').where({ id: org.id }).first();
  return { ...base, ...extra };
}

/** Write endpoints and the methods that take a JSON body. Ids are real so the handlers get past lookup. */
function writeEndpoints(): Array<{ method: string; path: string; headers?: Record<string, string> }> {
  return [
    { method: 'POST', path: '/api/clients' },
    { method: 'PATCH', path: `/api/clients/${dir.clientId}` },
    { method: 'POST', path: '/api/sites' },
    { method: 'PATCH', path: `/api/sites/${dir.siteId}` },
    { method: 'POST', path: '/api/gates' },
    { method: 'PATCH', path: `/api/gates/${dir.gateId}` },
    { method: 'POST', path: '/api/assessments' },
    { method: 'PATCH', path: `/api/assessments/${draftId}`, headers: { 'if-match': '"1"' } },
    { method: 'POST', path: '/api/score' },
    { method: 'POST', path: '/api/rulesets/amendments' },
    { method: 'PATCH', path: '/api/organisation' },
    { method: 'PATCH', path: `/api/users/${org.auditor.id}` },
    { method: 'POST', path: '/api/invitations' },
  ];
}

/**
 * A body no schema accepts: either not an object at all, or an object that carries at least
 * one field no schema knows (strict schemas refuse unknown fields), mixed with random values
 * under known-looking names.
 */
const hostileJson = fc.oneof(
  fc.jsonValue().filter((v) => v === null || typeof v !== 'object' || Array.isArray(v)),
  fc
    .record({
      known: fc.dictionary(
        fc.constantFrom(
          'name',
          'kind',
          'gateId',
          'family',
          'answers',
          'measurements',
          'role',
          'email',
          'input',
          'siteId',
          'clientId',
          'usageClass',
          'timeZone',
        ),
        fc.jsonValue(),
        { maxKeys: 5 },
      ),
      unknown: fc.string({ minLength: 1, maxLength: 12 }).map((s) => `zz${s.replace(/[^a-zA-Z0-9]/g, '')}x`),
      value: fc.jsonValue(),
    })
    .map(({ known, unknown, value }) => ({ ...known, [unknown]: value })),
);

const sqlish = fc.constantFrom(
  "'; drop table clients; --",
  "Robert'); DELETE FROM users;--",
  '" OR 1=1 --',
  '\\x00\u0000',
  '${7*7}',
  '<script>alert(1)</script>',
);

describe('hostile input', () => {
  it(
    'answers random JSON bodies on every write endpoint with 4xx and changes nothing',
    { timeout: 120_000 },
    async () => {
      const before = await snapshot();
      for (const endpoint of writeEndpoints()) {
        await fc.assert(
          fc.asyncProperty(hostileJson, async (body) => {
            const res = await owner.fetch(endpoint.path, {
              method: endpoint.method,
              headers: { 'content-type': 'application/json', ...(endpoint.headers ?? {}) },
              body: JSON.stringify(body),
            });
            const text = await res.text();
            expect(
              res.status,
              `${endpoint.method} ${endpoint.path} ${JSON.stringify(body).slice(0, 200)} → ${text.slice(0, 300)}`,
            ).toBeGreaterThanOrEqual(400);
            expect(res.status).toBeLessThan(500);
            expect(text).not.toMatch(/\bat [\w.<>]+ \(.*:\d+:\d+\)/); // never a stack trace
          }),
          { numRuns: 15 },
        );
      }
      expect(await snapshot()).toEqual(before);
    },
  );

  it(
    'answers malformed text and wrong content types with 4xx and changes nothing',
    { timeout: 60_000 },
    async () => {
      const before = await snapshot();
      const bodies = fc.oneof(
        fc.string({ maxLength: 200 }),
        fc.constantFrom('{', '{"name":', '[1,2', 'null null', '\u0000\u0001'),
      );
      for (const endpoint of writeEndpoints()) {
        await fc.assert(
          fc.asyncProperty(
            bodies,
            fc.constantFrom(
              'application/json',
              'text/plain',
              'application/x-www-form-urlencoded',
              'multipart/form-data; boundary=x',
            ),
            async (body, type) => {
              const res = await owner.fetch(endpoint.path, {
                method: endpoint.method,
                headers: { 'content-type': type, ...(endpoint.headers ?? {}) },
                body,
              });
              await res.arrayBuffer();
              expect(
                res.status,
                `${endpoint.method} ${endpoint.path} as ${type}: ${JSON.stringify(body)}`,
              ).toBeGreaterThanOrEqual(400);
              expect(res.status).toBeLessThan(500);
            },
          ),
          { numRuns: 6 },
        );
      }
      expect(await snapshot()).toEqual(before);
    },
  );

  it('refuses random files on every upload and stores nothing', { timeout: 60_000 }, async () => {
    const counts = async () => ({
      photos: (
        await testDb()('assessment_photos').where({ assessment_id: draftId }).count({ n: '*' }).first()
      )?.n,
      traces: (await testDb()('force_traces').where({ assessment_id: draftId }).count({ n: '*' }).first())?.n,
    });
    const before = await counts();
    const names = fc.constantFrom(
      'x.jpg',
      'x.png',
      '../../etc/passwd',
      '..%2F..%2Fboot.ini',
      'trace.csv',
      'report.pdf',
    );
    const bytes = fc.uint8Array({ minLength: 0, maxLength: 4096 });
    await fc.assert(
      fc.asyncProperty(bytes, names, async (content, name) => {
        const form = new FormData();
        form.set('photo', new Blob([content], { type: 'image/jpeg' }), name);
        form.set('itemKey', 'hingeGap');
        const res = await owner.fetch(`/api/assessments/${draftId}/photos`, { method: 'POST', body: form });
        const text = await res.text();
        expect(res.status, `photo ${name}: ${text.slice(0, 300)}`).toBeGreaterThanOrEqual(400);
        expect(res.status).toBeLessThan(500);
      }),
      { numRuns: 10 },
    );
    await fc.assert(
      fc.asyncProperty(bytes, names, async (content, name) => {
        const query = new URLSearchParams({
          itemKey: 'forceTest',
          location: 'closing_edge',
          direction: 'closing',
          gapMm: '300',
          fileName: name,
        });
        const res = await owner.fetch(`/api/assessments/${draftId}/force-traces?${query}`, {
          method: 'POST',
          headers: { 'content-type': 'text/csv' },
          body: content,
        });
        const text = await res.text();
        expect(res.status, `trace ${name}: ${text.slice(0, 300)}`).toBeGreaterThanOrEqual(400);
        expect(res.status).toBeLessThan(500);
      }),
      { numRuns: 10 },
    );
    await fc.assert(
      fc.asyncProperty(bytes, names, async (content, name) => {
        const form = new FormData();
        form.set('file', new Blob([content], { type: 'application/pdf' }), name);
        const res = await owner.fetch('/api/verify', { method: 'POST', body: form });
        await res.arrayBuffer();
        expect(res.status, `verify ${name}`).toBeLessThan(500); // "no match" is an answer, not an error
      }),
      { numRuns: 6 },
    );
    expect(await counts()).toEqual(before);
  });

  it('stores SQL-looking and markup text verbatim and returns it unchanged; refuses NUL characters by name', async () => {
    await fc.assert(
      fc.asyncProperty(sqlish, fc.string({ maxLength: 40 }), async (nasty, tail) => {
        const name = `${nasty}${tail}`.trim() || nasty;
        const created = await owner.json('POST', '/api/clients', { name, kind: 'business', notes: nasty });
        if (/\u0000/.test(name)) {
          // PostgreSQL text cannot hold NUL: the API says so, naming the field, and stores nothing.
          expect(created.status).toBe(422);
          expect((await created.json()).errors.map((e: { field: string }) => e.field)).toContain('name');
          return;
        }
        expect(created.status, await created.clone().text()).toBe(201);
        const { id } = await created.json();
        const read = await (await owner.fetch(`/api/clients/${id}`)).json();
        expect(read.name).toBe(name);
        expect(read.notes).toBe(nasty.trim() || null);
        const row = await testDb()('clients').where({ id }).first('name');
        expect(row.name).toBe(name);
      }),
      { numRuns: 12 },
    );
    // The tables the strings tried to drop are still there.
    expect(Number((await testDb()('users').count({ n: '*' }).first())?.n)).toBeGreaterThan(0);
  });
});
