/**
 * Re-inspection over HTTP: a draft started from the gate's last signed visit holds that visit's
 * answers and measurements (only those the pinned questions still ask), each pending until it
 * is confirmed or changed; submit refuses while any is pending, naming each; and a gate's
 * profile copied to a new gate on the same site.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { currentVersion, insertDraft, seedDirectory, type Directory } from './support/domain';

const family = 'north-american-gate';

let org: FixtureOrganisation;
let other: FixtureOrganisation;
let dir: Directory;
let auditor: TestClient;
let auditor2: TestClient;
let office: TestClient;
let otherOwner: TestClient;
let signedId: string;

const lastVisitAnswers = {
  placardsLegible: { value: 'yes' },
  // Not a question of the pinned version: never carried.
  retiredQuestion: { value: 'yes' },
};
const lastVisitMeasurements = {
  hingeGapMm: { value: 1, unit: 'in', canonical: 25.4 },
  controlDistanceMm: { value: 6, unit: 'ft', canonical: 1828.8 },
};

beforeAll(async () => {
  [org, other] = await Promise.all([createOrganisation('carry'), createOrganisation('carry-other')]);
  dir = await seedDirectory(org);
  const version = await currentVersion(family);
  const older = await insertDraft(org.id, dir.gateId, org.auditor.id, version.id, {
    status: 'signed',
    verdict: 'clear',
    visited_on: new Date('2025-01-10T10:00:00Z'),
    answers: JSON.stringify({ placardsLegible: { value: 'no' } }),
    measurements: JSON.stringify({}),
    result: JSON.stringify({ verdict: 'clear' }),
    result_sha256: 'a'.repeat(64),
    submitted_at: new Date('2025-01-10T12:00:00Z'),
    signed_at: new Date('2025-01-11T12:00:00Z'),
  });
  signedId = await insertDraft(org.id, dir.gateId, org.auditor.id, version.id, {
    status: 'signed',
    verdict: 'remedy',
    visited_on: new Date('2026-01-10T10:00:00Z'),
    answers: JSON.stringify(lastVisitAnswers),
    measurements: JSON.stringify(lastVisitMeasurements),
    result: JSON.stringify({ verdict: 'remedy' }),
    result_sha256: 'b'.repeat(64),
    submitted_at: new Date('2026-01-10T12:00:00Z'),
    signed_at: new Date('2026-01-11T12:00:00Z'),
  });
  expect(older).not.toBe(signedId);
  [auditor, auditor2, office, otherOwner] = await Promise.all([
    signIn(org.auditor.email, fixturePassword),
    signIn(org.auditor2.email, fixturePassword),
    signIn(org.office.email, fixturePassword),
    signIn(other.owner.email, fixturePassword),
  ]);
});

async function startCarried(client: TestClient, gateId = dir.gateId) {
  return client.json('POST', '/api/assessments', {
    gateId,
    family,
    purpose: 'inspection',
    carryForward: true,
  });
}

describe('a re-inspection carried forward from the last signed visit', () => {
  let draftId = '';

  it("starts with the newest signed visit's answers and measurements, each pending", async () => {
    const res = await startCarried(auditor);
    expect(res.status, await res.clone().text()).toBe(201);
    const draft = (await res.json()) as {
      id: string;
      answers: Record<string, unknown>;
      measurements: Record<string, unknown>;
    };
    draftId = draft.id;
    expect(draft.answers).toEqual({ placardsLegible: { value: 'yes' } });
    expect(draft.measurements).toEqual(lastVisitMeasurements);
    const carried = await (await auditor.json('GET', `/api/assessments/${draftId}/carried-forward`)).json();
    expect(carried).toMatchObject({
      fromAssessmentId: signedId,
      pending: ['answers.placardsLegible', 'measurements.controlDistanceMm', 'measurements.hingeGapMm'],
    });
    const audit = await testDb()('audit_events')
      .where({ entity_id: draftId, action: 'assessment.created' })
      .first('detail');
    expect(audit.detail).toMatchObject({ carriedForwardFrom: signedId, carried: 3 });
  });

  it('refuses to submit while carried answers are unconfirmed, naming each, and nothing changes', async () => {
    const before = await testDb()('assessments').where({ id: draftId }).first('status', 'row_version');
    const res = await auditor.json('POST', `/api/assessments/${draftId}/submit`, {});
    expect(res.status).toBe(422);
    expect(res.headers.get('content-type')).toMatch(/problem\+json/);
    const body = (await res.json()) as { errors: { field: string; message: string }[] };
    expect(body.errors.map((e) => e.field)).toEqual([
      'answers.placardsLegible',
      'measurements.controlDistanceMm',
      'measurements.hingeGapMm',
    ]);
    expect(body.errors[0]?.message).toMatch(/confirm or change/);
    expect(await testDb()('assessments').where({ id: draftId }).first('status', 'row_version')).toEqual(
      before,
    );
  });

  it('confirms an answer when it is changed, and when it is confirmed as it is', async () => {
    const current = await testDb()('assessments').where({ id: draftId }).first('row_version');
    const changed = await auditor.fetch(`/api/assessments/${draftId}`, {
      method: 'PATCH',
      headers: {
        'content-type': 'application/merge-patch+json',
        'if-match': `"${current.row_version}"`,
      },
      body: JSON.stringify({ measurements: { hingeGapMm: { value: 0.75, unit: 'in' } } }),
    });
    expect(changed.status, await changed.clone().text()).toBe(200);
    let carried = await (await auditor.json('GET', `/api/assessments/${draftId}/carried-forward`)).json();
    expect(carried.pending).toEqual(['answers.placardsLegible', 'measurements.controlDistanceMm']);

    const confirmed = await auditor.json('POST', `/api/assessments/${draftId}/carried-forward`, {
      keys: ['answers.placardsLegible'],
    });
    expect(confirmed.status).toBe(200);
    carried = await confirmed.json();
    expect(carried.pending).toEqual(['measurements.controlDistanceMm']);
    // Confirming keeps the value as it was.
    const row = await testDb()('assessments').where({ id: draftId }).first('answers');
    expect(row.answers.placardsLegible).toEqual({ value: 'yes' });
  });

  it('refuses bad confirmations with 4xx and a field, changing nothing', async () => {
    const before = await testDb()('assessments').where({ id: draftId }).first('carried_forward');
    for (const [body, status, field] of [
      [{ keys: ['answers.placardsLegible'] }, 422, 'keys.0'],
      [{ keys: ['measurements.controlDistanceMm', 'answers.nope'] }, 422, 'keys.1'],
      [{ keys: [] }, 422, 'keys'],
      [{ keys: 'answers.x' }, 422, 'keys'],
      [{ keys: ['x'], extra: 1 }, 422, ''],
    ] as const) {
      const res = await auditor.json('POST', `/api/assessments/${draftId}/carried-forward`, body);
      expect(res.status, JSON.stringify(body)).toBe(status);
      const problem = (await res.json()) as { errors: { field: string }[] };
      if (field) expect(problem.errors.map((e) => e.field)).toContain(field);
    }
    // Another auditor may not confirm; another organisation does not see it.
    expect(
      (
        await auditor2.json('POST', `/api/assessments/${draftId}/carried-forward`, {
          keys: ['measurements.controlDistanceMm'],
        })
      ).status,
    ).toBe(403);
    expect(
      (
        await otherOwner.json('POST', `/api/assessments/${draftId}/carried-forward`, {
          keys: ['measurements.controlDistanceMm'],
        })
      ).status,
    ).toBe(404);
    expect(await testDb()('assessments').where({ id: draftId }).first('carried_forward')).toEqual(before);
  });

  it('submits past the carried-forward check once every carried answer is confirmed', async () => {
    await auditor.json('POST', `/api/assessments/${draftId}/carried-forward`, {
      keys: ['measurements.controlDistanceMm'],
    });
    const res = await auditor.json('POST', `/api/assessments/${draftId}/submit`, {});
    // The draft may still lack answers the engine needs; what matters is that no carried answer is named.
    expect(await res.text()).not.toMatch(/carried forward/);
  });

  it('is a 422 on carryForward for a gate without a signed visit, and no draft is made', async () => {
    const count = async () =>
      Number((await testDb()('assessments').where({ gate_id: dir.homeGateId }).count({ n: '*' }))[0]?.n);
    const before = await count();
    const res = await startCarried(office, dir.homeGateId);
    expect(res.status).toBe(422);
    const body = (await res.json()) as { errors: { field: string }[] };
    expect(body.errors.map((e) => e.field)).toEqual(['carryForward']);
    expect(await count()).toBe(before);
  });
});

describe('duplicating a gate on a multi-gate site', () => {
  it("copies the gate's profile to a new gate on the same site, with its own name", async () => {
    await testDb()('gates')
      .where({ id: dir.gateId })
      .update({
        kind: 'swing',
        leaves: 'double',
        opening_direction: 'pull_to_open',
        width_mm: 3810,
        entered: JSON.stringify({ width: { value: 12.5, unit: 'ft' } }),
        operator: JSON.stringify({ listed: true, power: 'mains_ac' }),
      });
    const res = await office.json('POST', `/api/gates/${dir.gateId}/duplicate`, { label: 'East leaf pair' });
    expect(res.status, await res.clone().text()).toBe(201);
    const copy = (await res.json()) as { id: string };
    expect(copy.id).not.toBe(dir.gateId);
    const [original, duplicate] = await Promise.all(
      [dir.gateId, copy.id].map((id) =>
        testDb()('gates')
          .where({ id })
          .first(
            'organisation_id',
            'site_id',
            'label',
            'kind',
            'leaves',
            'opening_direction',
            'width_mm',
            'entered',
            'operator',
          ),
      ),
    );
    expect(duplicate).toEqual({ ...original, label: 'East leaf pair' });
    // History stays with the original.
    expect(await testDb()('assessments').where({ gate_id: copy.id }).count({ n: '*' })).toEqual([{ n: '0' }]);
  });

  it('names the copy after the original by default; refuses a bad name, a homeowner and another organisation', async () => {
    const res = await office.json('POST', `/api/gates/${dir.gateId}/duplicate`, {});
    expect(res.status).toBe(201);
    const label = (await testDb()('gates').where({ id: dir.gateId }).first('label')).label;
    expect(((await res.json()) as { label: string }).label).toBe(`${label} (copy)`);
    const count = async () =>
      Number((await testDb()('gates').where({ organisation_id: org.id }).count({ n: '*' }))[0]?.n);
    const before = await count();
    const bad = await office.json('POST', `/api/gates/${dir.gateId}/duplicate`, { label: '' });
    expect(bad.status).toBe(422);
    expect(((await bad.json()) as { errors: { field: string }[] }).errors[0]?.field).toBe('label');
    expect((await otherOwner.json('POST', `/api/gates/${dir.gateId}/duplicate`, {})).status).toBe(404);
    expect(await count()).toBe(before);
  });
});
