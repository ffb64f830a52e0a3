/**
 * `GET /api/assessments`: the page is JSON text the database builds (`listAssessmentsJson`), byte
 * for byte `JSON.stringify` of the page `listAssessments` gives (nulls, escapes, characters outside
 * the BMP, timestamps with microseconds, years outside 1-9999, a session time zone far from UTC);
 * an item the server already holds is not sent again while its rows are unchanged, a change to
 * any row an item shows is seen on the next page, and a held item never reaches a viewer the
 * query refuses.
 *
 * The comparison runs in this process against the test database (with a session time zone of
 * +13:45); the HTTP part runs a second server whose database connection goes through a relay
 * that counts the bytes PostgreSQL sends.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { AssessmentListQuerySchema } from '../../src/lib/api/assessments';
import type { SessionUser } from '../../src/lib/server/session-user';
import {
  closeTestDb,
  createOrganisation,
  fixturePassword,
  ownerTestDb,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { currentVersion, insertClient, insertDraft, insertGate, insertSite } from './support/domain';
import { startCountingServer, type CountingServer } from './support/counting-server';

// The modules under test read DATABASE_URL when they first connect: here with a session time zone
// whose offset has minutes, so nothing can lean on the database answering in UTC.
const inProcessUrl = new URL(inject('databaseUrl'));
inProcessUrl.searchParams.set('options', '-c TimeZone=Pacific/Chatham');
process.env.DATABASE_URL = inProcessUrl.toString();
const { listAssessments, listAssessmentsJson } = await import('../../src/lib/server/assessments/drafts');
const { forgetHeldPages } = await import('../../src/lib/server/listing');
const { closeDatabase, db } = await import('../../src/lib/server/db');

const family = 'north-american-gate';
let counting: CountingServer;
let org: FixtureOrganisation;
let owner: TestClient;
let gateId: string;
let clientId: string;
let submittedId: string;
const draftIds: string[] = [];

const viewerOf = (person: FixtureOrganisation['owner'], clientId: string | null = null): SessionUser => ({
  id: person.id,
  organisationId: org.id,
  email: person.email,
  name: person.name,
  role: person.role,
  clientId,
});
const queryOf = (search: string) =>
  AssessmentListQuerySchema.parse(Object.fromEntries(new URLSearchParams(search)));

/** The list on the counting server with the owner's cookie; the answer and the bytes PostgreSQL sent meanwhile. */
async function listOnCounted(search: string, client: TestClient = owner) {
  return counting.get(`/api/assessments?${search}`, client);
}

beforeAll(async () => {
  counting = await startCountingServer('list');

  org = await createOrganisation('list');
  owner = await signIn(org.owner.email, fixturePassword);
  const version = await currentVersion(family);
  // Names a JSON writer could get wrong: quotes, backslashes, control characters, U+2028, an
  // astral character, a lone high-bit Latin letter.
  clientId = await insertClient(org.id, { name: 'Quote "Lettings" \\ Back\tslash\u0001\u001f' });
  const siteId = await insertSite(org.id, clientId, {
    name: null,
    address_line1: 'Line\u2028separated \u00e9 \ud83d\udea7 Row',
    city: 'Ōldbridge </script>',
  });
  gateId = await insertGate(org.id, siteId, { label: 'Yard gate \u00e6 "north"\n' });
  const homeSiteId = await insertSite(org.id, org.clientId, { name: 'Home \ud834\udd1e site' });
  const homeGateId = await insertGate(org.id, homeSiteId, { label: 'Home gate' });

  // Drafts with awkward times: microseconds on both sides of a millisecond, no visit at all,
  // 1 BC and 10000 AD in UTC (what a four-digit year with an offset can come to), 0001-01-01.
  const visits = [
    '2026-03-01 12:00:00.999999+00',
    '2026-03-01 12:00:00.0005+00',
    null,
    '0001-12-31 23:30:00+00 BC',
    '10000-01-01 04:00:00+00',
    '0001-01-01 00:00:00+00',
    '1969-12-31 23:59:59.123456+00',
  ];
  for (const [i, visit] of visits.entries())
    draftIds.push(
      await insertDraft(org.id, i % 3 ? gateId : homeGateId, org.auditor.id, version.id, {
        visited_on: visit,
        purpose: i % 2 ? 'service' : 'inspection',
      }),
    );

  // One submitted: its summary's frozen values come from scored_summary.
  const draft = await owner.json('POST', '/api/assessments', { gateId, family, purpose: 'handover' });
  expect(draft.status, await draft.clone().text()).toBe(201);
  submittedId = (await draft.json()).id;
  const saved = await owner.fetch(`/api/assessments/${submittedId}`, {
    method: 'PATCH',
    headers: { 'content-type': 'application/merge-patch+json', 'if-match': '"1"' },
    body: JSON.stringify({
      observations: {
        site: {
          pedestriansUseDriveway: true,
          childrenOrPetsPresent: false,
          publicAccess: false,
          slopeAcrossSwing: false,
        },
      },
    }),
  });
  expect(saved.status, await saved.clone().text()).toBe(200);
  const submitted = await owner.json('POST', `/api/assessments/${submittedId}/submit`);
  expect(submitted.status, await submitted.clone().text()).toBe(200);
}, 120_000);

afterAll(async () => {
  await counting?.stop();
  await closeDatabase();
  await closeTestDb();
});

describe('the assessment list as JSON text', () => {
  const searches = [
    '',
    'pageSize=3',
    'pageSize=3&page=2',
    'pageSize=3&page=9',
    'sort=visitedOn',
    'sort=-createdAt&purpose=service',
    'sort=submittedAt',
    'sort=updatedAt&status=scored',
    'status=signed',
    'gateKind=swing&from=2026-03-01&to=2026-03-01',
  ];

  it('is byte for byte JSON.stringify of the page, the first time and from what is held', async () => {
    forgetHeldPages();
    for (const viewer of [
      viewerOf(org.owner),
      viewerOf(org.auditor),
      viewerOf(org.homeowner, org.clientId),
    ]) {
      for (const search of searches) {
        const query = queryOf(search);
        const expected = JSON.stringify(await listAssessments(viewer, 'Pacific/Auckland', query));
        const first = await listAssessmentsJson(viewer, 'Pacific/Auckland', query);
        const again = await listAssessmentsJson(viewer, 'Pacific/Auckland', query);
        expect(first, `${viewer.role} ${search}`).toBe(expected);
        expect(again, `${viewer.role} ${search} (held)`).toBe(expected);
      }
    }
    // The awkward values did reach the page.
    const all = JSON.parse(await listAssessmentsJson(viewerOf(org.owner), 'UTC', queryOf('pageSize=100')));
    const visits = all.items.map((i: { visitedOn: string | null }) => i.visitedOn);
    expect(visits).toEqual(
      expect.arrayContaining([
        null,
        '0000-12-31T23:30:00.000Z',
        '+010000-01-01T04:00:00.000Z',
        '0001-01-01T00:00:00.000Z',
        '2026-03-01T12:00:00.999Z',
        '2026-03-01T12:00:00.000Z',
        '1969-12-31T23:59:59.123Z',
      ]),
    );
    expect(all.items.some((i: { site: { name: string | null } }) => i.site.name === null)).toBe(true);
  });

  it('shows a changed row on the next page, whichever of its rows changed', async () => {
    const viewer = viewerOf(org.owner);
    const query = queryOf('pageSize=100');
    const same = async () =>
      expect(await listAssessmentsJson(viewer, 'UTC', query)).toBe(
        JSON.stringify(await listAssessments(viewer, 'UTC', query)),
      );
    await same();
    await testDb()('gates').where({ id: gateId }).update({ label: 'Relabelled gate' });
    await same();
    await testDb()('users').where({ id: org.auditor.id }).update({ name: 'Renamed Auditor' });
    await same();
    await testDb()('assessments').where({ id: draftIds[0] }).update({ purpose: 'handover' });
    await same();
    const page = JSON.parse(await listAssessmentsJson(viewer, 'UTC', query));
    expect(page.items.find((i: { id: string }) => i.id === draftIds[1]).gate.label).toBe('Relabelled gate');
    expect(page.items.find((i: { id: string }) => i.id === draftIds[0]).auditor.name).toBe('Renamed Auditor');
    expect(page.items.find((i: { id: string }) => i.id === draftIds[0]).purpose).toBe('handover');
  });

  it('runs as one statement whose rows carry keys only once the page is held', async () => {
    forgetHeldPages();
    const viewer = viewerOf(org.owner);
    const query = queryOf('pageSize=100');
    const statements: string[] = [];
    const log = (q: { sql: string }) => statements.push(q.sql);
    db().on('query', log);
    try {
      await listAssessmentsJson(viewer, 'UTC', query);
      await listAssessmentsJson(viewer, 'UTC', query);
    } finally {
      db().off('query', log);
    }
    expect(statements).toHaveLength(2);
    expect(statements[0]).toContain('row_to_json');
    expect(statements[1]).not.toContain('row_to_json');
  });
});

describe('GET /api/assessments', () => {
  it('has the database send the items only while the server does not hold them', async () => {
    // The session check and a pooled connection, out of the way.
    expect((await listOnCounted('pageSize=1&sort=createdAt')).res.status).toBe(200);
    const first = await listOnCounted('pageSize=100');
    expect(first.res.status).toBe(200);
    expect(first.res.headers.get('content-type')).toBe('application/json');
    expect(JSON.parse(first.text).total).toBe(draftIds.length + 1);
    const again = await listOnCounted('pageSize=100');
    expect(again.text).toBe(first.text);
    // The page's keys and nothing else: well under half of what the items took.
    expect(again.databaseBytes).toBeLessThan(first.databaseBytes / 2);
    // A change is seen at once, and only the changed row's item is sent again.
    await testDb()('clients').where({ id: clientId }).update({ name: 'Renamed Lettings' });
    const changed = await listOnCounted('pageSize=100');
    const items = JSON.parse(changed.text).items as {
      id: string;
      status: string;
      gate: { id: string };
      client: { name: string };
    }[];
    const drafts = items.filter((i) => i.gate.id === gateId && i.status === 'draft');
    expect(drafts.length).toBeGreaterThan(0);
    expect(drafts.every((i) => i.client.name === 'Renamed Lettings')).toBe(true);
    // The submitted one shows its frozen record's name still.
    expect(items.find((i) => i.id === submittedId)?.client.name).toBe(
      'Quote "Lettings" \\ Back\tslash\u0001\u001f',
    );
    expect(changed.databaseBytes).toBeLessThan(first.databaseBytes);
  });

  it('never gives a held item to a viewer the query refuses', async () => {
    const held = await listOnCounted('pageSize=100');
    expect(JSON.parse(held.text).items.length).toBeGreaterThan(0);
    const other = await createOrganisation('list-other');
    const otherOwner = await signIn(other.owner.email, fixturePassword);
    const refused = await listOnCounted('pageSize=100', otherOwner);
    expect(refused.res.status).toBe(200);
    expect(JSON.parse(refused.text)).toEqual({ items: [], page: 1, pageSize: 100, total: 0 });
    // The same organisation's auditor sees the rows too (the query lets them), from what is held.
    const auditor = await signIn(org.auditor.email, fixturePassword);
    expect((await listOnCounted('pageSize=100', auditor)).text).toBe(held.text);
  });

  it('drops a held row that no longer matches the filter', async () => {
    const before = JSON.parse((await listOnCounted('purpose=service&pageSize=100')).text);
    const moved = before.items[0].id as string;
    await ownerTestDb()('assessments').where({ id: moved }).update({ purpose: 'inspection' });
    const after = JSON.parse((await listOnCounted('purpose=service&pageSize=100')).text);
    expect(after.items.map((i: { id: string }) => i.id)).not.toContain(moved);
    expect(after.total).toBe(before.total - 1);
  });
});
