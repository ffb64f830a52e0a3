/**
 * Who may start a revision of a signed report, and what discarding that draft does: owner,
 * office and the report's own auditor revise; another auditor is refused and nothing changes.
 * Discarding a draft revision puts the original back to signed, with an audit event.
 */
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
let versionId: string;
let clients: Record<'owner' | 'office' | 'auditor' | 'auditor2', TestClient>;

beforeAll(async () => {
  org = await createOrganisation('revisions');
  dir = await seedDirectory(org);
  const [family] = await publishedFamilies();
  versionId = (await currentVersion(family as string)).id;
  const [owner, office, auditor, auditor2] = await Promise.all(
    [org.owner, org.office, org.auditor, org.auditor2].map((p) => signIn(p.email, fixturePassword)),
  );
  clients = { owner, office, auditor, auditor2 };
});
afterAll(async () => {
  await closeTestDb();
});

/** A report walked by the first auditor, recorded as signed. */
function signedReport(): Promise<string> {
  return insertDraft(org.id, dir.gateId, org.auditor.id, versionId, {
    status: 'signed',
    verdict: 'clear',
    result: JSON.stringify({ verdict: 'clear' }),
    result_sha256: 'a'.repeat(64),
    submitted_at: testDb().fn.now(),
    signed_at: testDb().fn.now(),
  });
}

const statusOf = async (id: string) => (await testDb()('assessments').where({ id }).first('status'))?.status;

describe('starting a revision of a signed report', () => {
  it('refuses another auditor with 403 and leaves the report signed, with no draft made', async () => {
    const id = await signedReport();
    const res = await clients.auditor2.json('POST', `/api/assessments/${id}/revise`, {});
    expect(res.status).toBe(403);
    expect(res.headers.get('content-type')).toMatch(/problem\+json/);
    expect(await statusOf(id)).toBe('signed');
    expect(await testDb()('assessments').where({ supersedes_id: id }).count({ n: '*' })).toEqual([
      { n: '0' },
    ]);
  });

  for (const who of ['owner', 'office', 'auditor'] as const) {
    it(`lets the ${who === 'auditor' ? "report's own auditor" : who} revise`, async () => {
      const id = await signedReport();
      const res = await clients[who].json('POST', `/api/assessments/${id}/revise`, {});
      expect(res.status).toBe(201);
      expect(await statusOf(id)).toBe('superseded');
    });
  }
});

describe('discarding a draft revision', () => {
  it('puts the original back to signed and records it', async () => {
    const id = await signedReport();
    const revision = await (await clients.auditor.json('POST', `/api/assessments/${id}/revise`, {})).json();
    expect(await statusOf(id)).toBe('superseded');

    const res = await clients.auditor.json('DELETE', `/api/assessments/${revision.id}`);
    expect(res.status).toBe(204);
    expect(await statusOf(revision.id)).toBeUndefined();
    expect(await statusOf(id)).toBe('signed');
    const events = await testDb()('audit_events')
      .where({ organisation_id: org.id, action: 'assessment.revision_discarded', entity_id: id })
      .select('actor_user_id', 'detail');
    expect(events).toEqual([
      {
        actor_user_id: org.auditor.id,
        detail: { discardedRevisionId: revision.id, restoredStatus: 'signed' },
      },
    ]);
    // The restored report can be revised again.
    expect((await clients.office.json('POST', `/api/assessments/${id}/revise`, {})).status).toBe(201);
  });

  it("refuses another auditor's discard of the draft, leaving both as they were", async () => {
    const id = await signedReport();
    const revision = await (await clients.office.json('POST', `/api/assessments/${id}/revise`, {})).json();
    expect((await clients.auditor2.json('DELETE', `/api/assessments/${revision.id}`)).status).toBe(403);
    expect(await statusOf(revision.id)).toBe('draft');
    expect(await statusOf(id)).toBe('superseded');
  });

  it('still refuses to turn a superseded report back to signed while its revision exists (database guard)', async () => {
    const id = await signedReport();
    await clients.owner.json('POST', `/api/assessments/${id}/revise`, {});
    await expect(testDb().raw(`update assessments set status = 'signed' where id = ?`, [id])).rejects.toThrow(
      /read-only/,
    );
    expect(await statusOf(id)).toBe('superseded');
  });
});
