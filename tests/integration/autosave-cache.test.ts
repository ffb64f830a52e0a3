/**
 * The autosave's short way: a save over the row version this instance saved last is one
 * conditional UPDATE naming the row's `xmin`, and the database refuses it whenever the row was
 * written since by anyone (another instance, a confirmation that leaves the row version alone,
 * SQL by hand), so the save is then made the long way over the row as it stands. Counted by the
 * server under test (QUERY_COUNT_HEADER=1 answers `x-query-count`). Another organisation,
 * another auditor and a homeowner never ride what this instance knows of someone's draft.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { freePort, startAppServer, type RunningServer } from '../../src/cli/services';
import {
  closeTestDb,
  createOrganisation,
  fixturePassword,
  signIn,
  signInHomeowner,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { currentVersion, insertDraft, seedDirectory, type Directory } from './support/domain';

const serverEnv = inject('serverEnv') as Record<string, string>;
const publicUrl = serverEnv.PUBLIC_URL;

let org: FixtureOrganisation;
let dir: Directory;
let versionId: string;
let auditor: TestClient;
/** A second instance of the app on the same database, as behind a load balancer. */
let other: RunningServer;

beforeAll(async () => {
  org = await createOrganisation('autosave-cache');
  dir = await seedDirectory(org);
  versionId = (await currentVersion('north-american-gate')).id;
  auditor = await signIn(org.auditor.email, fixturePassword);
  other = await startAppServer({ port: await freePort(), quiet: true, env: serverEnv });
}, 120_000);
afterAll(async () => {
  await other?.stop();
  await closeTestDb();
});

interface Saved {
  status: number;
  queries: number;
  etag: string | null;
  applied: string | null;
  body: Record<string, unknown> & { rowVersion?: number; answers?: Record<string, unknown> };
}

/** A PATCH as the walk-through sends it (merge patch, If-Match; `minimal` asks for the short answer). */
async function save(
  client: TestClient,
  id: string,
  rowVersion: number,
  patch: Record<string, unknown>,
  options: { minimal?: boolean; via?: RunningServer } = {},
): Promise<Saved> {
  const headers: Record<string, string> = {
    'content-type': 'application/merge-patch+json',
    accept: 'application/json',
    'if-match': `"${rowVersion}"`,
    ...(options.minimal ? { prefer: 'return=minimal' } : {}),
  };
  const init = { method: 'PATCH', headers, body: JSON.stringify(patch) };
  // The session's check, out of the way (it is looked up again after SESSION_RECHECK_MS).
  await client.fetch('/api/no-such-route');
  const res = options.via
    ? await fetch(`${options.via.url}/api/assessments/${id}`, {
        ...init,
        headers: { ...headers, cookie: client.cookie, origin: publicUrl },
      })
    : await client.fetch(`/api/assessments/${id}`, init);
  return {
    status: res.status,
    queries: Number(res.headers.get('x-query-count')),
    etag: res.headers.get('etag'),
    applied: res.headers.get('preference-applied'),
    body: await res.json(),
  };
}

const answer = (key: string, value: string, note?: string) => ({
  answers: { [key]: note === undefined ? { value } : { value, note } },
});

async function rowOf(id: string) {
  return testDb()('assessments')
    .where({ id })
    .first('row_version', 'answers', 'carried_forward', 'updated_at', testDb().raw('xmin::text as xmin'));
}

async function getJson(client: TestClient, id: string) {
  const res = await client.fetch(`/api/assessments/${id}`, { headers: { accept: 'application/json' } });
  expect(res.status).toBe(200);
  return res.json();
}

/** A draft of the fixture auditor's that this instance has saved once (so it knows it at version 2). */
async function knownDraft(fields: Record<string, unknown> = {}): Promise<string> {
  const id = await insertDraft(org.id, dir.gateId, org.auditor.id, versionId, fields);
  const first = await save(auditor, id, 1, answer('latchFitted', 'no', 'first'));
  expect(first.status, JSON.stringify(first.body)).toBe(200);
  return id;
}

describe('a save over the version this instance saved last', () => {
  it('is one statement, and answers exactly what the long way answers (full or minimal)', async () => {
    const id = await knownDraft();
    const full = await save(auditor, id, 2, answer('latchFitted', 'no', 'second'));
    expect(full).toMatchObject({ status: 200, queries: 1, etag: '"3"', applied: null });
    expect(full.body).toEqual(await getJson(auditor, id));

    const minimal = await save(auditor, id, 3, answer('placardsLegible', 'yes'), { minimal: true });
    expect(minimal).toMatchObject({ status: 200, queries: 1, etag: '"4"', applied: 'return=minimal' });
    const read = await getJson(auditor, id);
    expect(minimal.body).toEqual({
      id,
      status: 'draft',
      rowVersion: 4,
      updatedAt: read.updatedAt,
      answers: read.answers,
      measurements: read.measurements,
      observations: read.observations,
    });
    expect(read.answers).toEqual({
      latchFitted: { value: 'no', note: 'second' },
      placardsLegible: { value: 'yes' },
    });
    // The full answer stays the default, also for a save the long way round.
    expect(Object.keys(full.body)).toEqual(Object.keys(read));
  });

  it('keeps 409 with current, 422 with field errors and their order, and changes nothing on either', async () => {
    const id = await knownDraft();
    const before = await rowOf(id);
    const stale = await save(auditor, id, 1, answer('latchFitted', 'yes'), { minimal: true });
    expect(stale.status).toBe(409);
    expect(stale.body.current).toEqual(await getJson(auditor, id));
    const invalid = await save(auditor, id, 2, answer('noSuchQuestion', 'yes'), { minimal: true });
    expect(invalid.status).toBe(422);
    expect(invalid.body.errors).toEqual([
      { field: 'answers.noSuchQuestion', message: 'is not a question of the pinned ruleset version' },
    ]);
    expect(await rowOf(id)).toEqual(before);
    // Still known: the next good save is the short way.
    expect(await save(auditor, id, 2, answer('latchFitted', 'yes'))).toMatchObject({
      status: 200,
      queries: 1,
    });
  });
});

describe('a row written behind this instance’s back', () => {
  it('a change by SQL that leaves the row version alone is merged with, never overwritten from memory', async () => {
    const id = await knownDraft();
    expect(await save(auditor, id, 2, answer('latchFitted', 'no', 'second'))).toMatchObject({
      status: 200,
      queries: 1,
    });
    await testDb()('assessments')
      .where({ id })
      .update({ answers: testDb().raw(`answers || '{"operatorLabelReadable":{"value":"no"}}'::jsonb`) });

    // The short way is refused by the database (1), then the row is read (2) and saved (3).
    const after = await save(auditor, id, 3, answer('placardsLegible', 'yes'));
    expect(after).toMatchObject({ status: 200, queries: 3, etag: '"4"' });
    const expected = {
      latchFitted: { value: 'no', note: 'second' },
      operatorLabelReadable: { value: 'no' },
      placardsLegible: { value: 'yes' },
    };
    expect(after.body.answers).toEqual(expected);
    expect((await rowOf(id)).answers).toEqual(expected);
    expect(await save(auditor, id, 4, answer('pedestrianEntrance', 'no'))).toMatchObject({
      status: 200,
      queries: 1,
    });
  });

  it('confirming a carried-forward answer (row version unchanged) is not undone by the next save', async () => {
    const carried = {
      fromAssessmentId: '00000000-0000-4000-8000-000000000001',
      fromVisitedOn: null,
      pending: ['answers.placardsLegible', 'answers.operatorLabelReadable', 'answers.pedestrianEntrance'],
    };
    const id = await knownDraft({
      carried_forward: JSON.stringify(carried),
      answers: JSON.stringify({ placardsLegible: { value: 'yes' }, operatorLabelReadable: { value: 'yes' } }),
    });
    // Saving a carried answer confirms it, the short way too.
    expect(await save(auditor, id, 2, answer('pedestrianEntrance', 'no'))).toMatchObject({
      status: 200,
      queries: 1,
    });
    const confirmed = await auditor.json('POST', `/api/assessments/${id}/carried-forward`, {
      keys: ['answers.placardsLegible'],
    });
    expect(confirmed.status).toBe(200);
    expect((await rowOf(id)).row_version).toBe(3);

    const next = await save(auditor, id, 3, answer('latchFitted', 'yes'));
    expect(next).toMatchObject({ status: 200, queries: 3 });
    expect((await rowOf(id)).carried_forward.pending).toEqual(['answers.operatorLabelReadable']);
    const shown = await (await auditor.json('GET', `/api/assessments/${id}/carried-forward`)).json();
    expect(shown.pending).toEqual(['answers.operatorLabelReadable']);
  });

  it('a save through another instance: a stale save here is 409 with its change, a current one merges it', async () => {
    const id = await knownDraft();
    expect(await save(auditor, id, 2, answer('latchFitted', 'no', 'here'))).toMatchObject({
      status: 200,
      queries: 1,
    });
    const there = await save(auditor, id, 3, answer('placardsLegible', 'no'), { via: other, minimal: true });
    expect(there).toMatchObject({ status: 200, etag: '"4"' });

    // This instance still knows version 3: the database refuses (1), the row is read (2), and
    // the refusal shows the assessment as it now is (3).
    const stale = await save(auditor, id, 3, answer('latchFitted', 'yes'), { minimal: true });
    expect(stale).toMatchObject({ status: 409, queries: 3 });
    expect((stale.body.current as { rowVersion: number }).rowVersion).toBe(4);
    expect((stale.body.current as { answers: unknown }).answers).toEqual({
      latchFitted: { value: 'no', note: 'here' },
      placardsLegible: { value: 'no' },
    });

    const current = await save(auditor, id, 4, answer('latchFitted', 'yes'), { minimal: true });
    expect(current).toMatchObject({ status: 200, queries: 2, etag: '"5"' });
    expect(current.body.answers).toEqual({
      latchFitted: { value: 'yes', note: 'here' },
      placardsLegible: { value: 'no' },
    });
    expect(await save(auditor, id, 5, answer('pedestrianEntrance', 'no'), { minimal: true })).toMatchObject({
      status: 200,
      queries: 1,
    });
  });
});

describe('what this instance knows of a draft is no one else’s to use', () => {
  it('another organisation, another auditor and a homeowner are refused as before; the office may save', async () => {
    const id = await knownDraft();
    expect(await save(auditor, id, 2, answer('latchFitted', 'no', 'mine'))).toMatchObject({
      status: 200,
      queries: 1,
    });
    const before = await rowOf(id);

    const stranger = await createOrganisation('autosave-cache-other');
    const strangerOffice = await signIn(stranger.office.email, fixturePassword);
    const foreign = await save(strangerOffice, id, 3, answer('latchFitted', 'yes'), { minimal: true });
    expect(foreign.status).toBe(404);

    const auditor2 = await signIn(org.auditor2.email, fixturePassword);
    const colleague = await save(auditor2, id, 3, answer('latchFitted', 'yes'), { minimal: true });
    expect(colleague.status).toBe(403);

    const homeowner = await signInHomeowner(org.homeowner.email);
    expect((await save(homeowner, id, 3, answer('latchFitted', 'yes'))).status).toBe(403);
    expect(await rowOf(id)).toEqual(before);

    // The auditor's own next save is still the short way: nobody else's attempt wrote the row.
    expect(await save(auditor, id, 3, answer('placardsLegible', 'yes'))).toMatchObject({
      status: 200,
      queries: 1,
    });
    // The office of the organisation may change an auditor's draft, the short way too.
    const office = await signIn(org.office.email, fixturePassword);
    const byOffice = await save(office, id, 4, answer('pedestrianEntrance', 'no'), { minimal: true });
    expect(byOffice).toMatchObject({ status: 200, queries: 1, etag: '"5"' });
    expect(byOffice.body.answers).toEqual({
      latchFitted: { value: 'no', note: 'mine' },
      placardsLegible: { value: 'yes' },
      pedestrianEntrance: { value: 'no' },
    });
  });

  it('a draft handed to another auditor by SQL is refused to the first, though this instance knew it', async () => {
    const id = await knownDraft();
    expect(await save(auditor, id, 2, answer('latchFitted', 'no', 'mine'))).toMatchObject({
      status: 200,
      queries: 1,
    });
    await testDb()('assessments').where({ id }).update({ auditor_id: org.auditor2.id });
    const refused = await save(auditor, id, 3, answer('latchFitted', 'yes'), { minimal: true });
    expect(refused).toMatchObject({ status: 403, queries: 3 });
    expect((await rowOf(id)).row_version).toBe(3);
  });
});

describe('what a draft save costs the table', () => {
  it('no index holds a column a draft save writes, and pages keep room for the next version (HOT updates)', async () => {
    const written = [
      'answers',
      'measurements',
      'observations',
      'row_version',
      'updated_at',
      'carried_forward',
    ];
    const { rows } = await testDb().raw<{ rows: { indexname: string; indexdef: string }[] }>(
      `select indexname, indexdef from pg_indexes where schemaname = current_schema() and tablename = 'assessments'`,
    );
    expect(rows.length).toBeGreaterThan(1);
    const holding = rows.filter(({ indexdef }) =>
      written.some((column) => new RegExp(`\\b${column}\\b`).test(indexdef.replace(/^.*? USING /, ''))),
    );
    expect(holding).toEqual([]);
    // The auditor's own list by last change still finds their rows through an index.
    expect(rows.map((r) => r.indexdef)).toContainEqual(
      expect.stringMatching(/\(organisation_id, auditor_id\)$/),
    );
    const table = await testDb().raw<{ rows: { reloptions: string[] | null }[] }>(
      `select reloptions from pg_class where oid = 'assessments'::regclass`,
    );
    expect(table.rows[0].reloptions).toContain('fillfactor=80');
  });
});
