/**
 * `GET /api/assessments/:id`: the answer is byte for byte the document the rest of the API gives
 * for the assessment (the save's and the submit's answers), the database sends a submitted
 * record once per version of its row and the server holds it after that, a record changed by
 * hand is seen on the next read, and a held record is never shown to a viewer the query refuses.
 *
 * A second server instance runs here with its database connection through a relay that counts
 * the bytes PostgreSQL sends.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  createOrganisation,
  fixturePassword,
  ownerTestDb,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { insertClient, insertGate, insertSite } from './support/domain';
import { saveNewDraft } from './support/draft-over-http';
import { startCountingServer, type CountingServer } from './support/counting-server';

const family = 'north-american-gate';
let counting: CountingServer;
let org: FixtureOrganisation;
let owner: TestClient;
let assessmentId: string;
let savedText: string;
let submittedText: string;

/** A GET on the counting instance with the owner's cookie; returns the answer and the bytes the database sent meanwhile. */
async function readOnCounted(id: string, client: TestClient = owner) {
  return counting.get(`/api/assessments/${id}`, client);
}

beforeAll(async () => {
  counting = await startCountingServer('read');

  org = await createOrganisation('read');
  owner = await signIn(org.owner.email, fixturePassword);
  const clientId = await insertClient(org.id, { name: 'Harrowby Lettings' });
  const siteId = await insertSite(org.id, clientId, { address_line1: '3 Fenwick Row', city: 'Oldbridge' });
  const gateId = await insertGate(org.id, siteId, { label: 'Yard gate', width_mm: 3660 });
  const { id, saved } = await saveNewDraft(
    owner,
    { gateId, family },
    {
      answers: { placardsLegible: { value: 'no' } },
      observations: {
        site: {
          pedestriansUseDriveway: true,
          childrenOrPetsPresent: false,
          publicAccess: false,
          slopeAcrossSwing: false,
        },
      },
    },
  );
  assessmentId = id;
  expect(saved.status).toBe(200);
  savedText = await saved.text();
}, 120_000);

afterAll(async () => {
  await counting?.stop();
});

describe('reading one assessment', () => {
  it('gives a draft exactly as the save answered it', async () => {
    const { res, text } = await readOnCounted(assessmentId);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/json');
    expect(res.headers.get('etag')).toBe('"2"');
    expect(text).toBe(savedText);
  });

  it('gives a submitted assessment exactly as the submit answered it, on every read', async () => {
    const submitted = await owner.json('POST', `/api/assessments/${assessmentId}/submit`);
    expect(submitted.status).toBe(200);
    submittedText = await submitted.text();
    expect(JSON.parse(submittedText).result.findings.length).toBeGreaterThan(10);
    for (let i = 0; i < 3; i++) {
      const { res, text } = await readOnCounted(assessmentId);
      expect(res.status).toBe(200);
      expect(text).toBe(submittedText);
    }
  });

  it('has the database send the record only while the server does not hold it', async () => {
    const { recordBytes } = await testDb()('assessments')
      .where({ id: assessmentId })
      .first(testDb().raw('octet_length(scored_record::text)::int as "recordBytes"'));
    expect(recordBytes).toBeGreaterThan(20_000);
    const again = await readOnCounted(assessmentId);
    expect(again.text).toBe(submittedText);
    // The row without its record, and nothing else: well under a tenth of the record.
    expect(again.databaseBytes).toBeLessThan(recordBytes / 10);
  });

  it('answers 404 to another organisation even while the record is held', async () => {
    expect((await readOnCounted(assessmentId)).res.status).toBe(200);
    const other = await createOrganisation('read-other');
    const otherOwner = await signIn(other.owner.email, fixturePassword);
    const refused = await readOnCounted(assessmentId, otherOwner);
    expect(refused.res.status).toBe(404);
    expect(refused.text).not.toContain('Yard gate');
  });

  it('shows a record changed by hand on the next read, and refuses one that no longer parses', async () => {
    await readOnCounted(assessmentId);
    const owners = ownerTestDb();
    const change = (sql: string) =>
      owners.transaction(async (trx) => {
        await trx.raw('alter table assessments disable trigger assessments_scored_record_guard');
        await trx.raw(`update assessments set scored_record = ${sql} where id = ?`, [assessmentId]);
        await trx.raw('alter table assessments enable trigger assessments_scored_record_guard');
      });
    await change(`jsonb_set(scored_record, '{gate,label}', '"Relabelled by hand"')`);
    const changed = await readOnCounted(assessmentId);
    expect(changed.res.status).toBe(200);
    const body = JSON.parse(changed.text);
    expect(body.gate.label).toBe('Relabelled by hand');
    expect(body.gateSnapshot.label).toBe('Relabelled by hand');

    await change(`jsonb_set(scored_record, '{result}', '{"verdict": "clear"}')`);
    const damaged = await readOnCounted(assessmentId);
    expect(damaged.res.status).toBe(500);
    expect(damaged.res.headers.get('content-type')).toContain('application/problem+json');
    expect(JSON.parse(damaged.text).detail).toMatch(/damaged/);
  });
});
