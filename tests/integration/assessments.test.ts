/**
 * An assessment's life through HTTP: a draft pinned to the family's current published
 * version, saved in pieces over row versions, submitted and scored once, with the stored
 * SHA-256 equal to the engine's own recomputation and audit events for create and submit.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { resultSha256, scoreParsed, VERDICTS, type RulesetVersion } from '@/lib/rules';
import { buildEngineInput } from '@/lib/server/assessment-input';
import { verifyOrganisationTrail } from '@/lib/server/audit-trail';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  signInHomeowner,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { currentVersion, insertGate, insertSite, seedDirectory, type Directory } from './support/domain';

const family = 'north-american-gate';
const siteContext = {
  pedestriansUseDriveway: true,
  childrenOrPetsPresent: true,
  publicAccess: false,
  slopeAcrossSwing: false,
};

let org: FixtureOrganisation;
let other: FixtureOrganisation;
let dir: Directory;
let owner: TestClient;
let office: TestClient;
let auditor: TestClient;
let auditor2: TestClient;
let homeowner: TestClient;
let otherOwner: TestClient;

beforeAll(async () => {
  [org, other] = await Promise.all([createOrganisation('assess'), createOrganisation('assess-other')]);
  dir = await seedDirectory(org);
  [owner, office, auditor, auditor2, homeowner, otherOwner] = await Promise.all([
    signIn(org.owner.email, fixturePassword),
    signIn(org.office.email, fixturePassword),
    signIn(org.auditor.email, fixturePassword),
    signIn(org.auditor2.email, fixturePassword),
    signInHomeowner(org.homeowner.email),
    signIn(other.owner.email, fixturePassword),
  ]);
});

async function startDraft(client: TestClient, gateId = dir.gateId, extra: Record<string, unknown> = {}) {
  const res = await client.json('POST', '/api/assessments', {
    gateId,
    family,
    purpose: 'inspection',
    ...extra,
  });
  expect(res.status, await res.clone().text()).toBe(201);
  return res.json();
}

function patch(client: TestClient, id: string, version: number | null, body: unknown) {
  const headers: Record<string, string> = {
    'content-type': 'application/merge-patch+json',
    accept: 'application/json',
  };
  if (version !== null) headers['if-match'] = `"${version}"`;
  return client.fetch(`/api/assessments/${id}`, { method: 'PATCH', headers, body: JSON.stringify(body) });
}

async function auditActions(
  entityId: string,
): Promise<{ action: string; detail: Record<string, unknown>; actor_user_id: string }[]> {
  return testDb()('audit_events')
    .where({ entity_type: 'assessment', entity_id: entityId })
    .orderBy('id')
    .select('action', 'detail', 'actor_user_id');
}

describe('an assessment from draft to scored', () => {
  let id: string;

  it('starts as a draft pinned to the family’s current published version, audited', async () => {
    const created = await startDraft(auditor);
    id = created.id;
    const pinned = await currentVersion(family);
    expect(created).toMatchObject({
      status: 'draft',
      purpose: 'inspection',
      verdict: null,
      rowVersion: 1,
      gate: { id: dir.gateId, kind: 'swing' },
      client: { id: dir.clientId },
      auditor: { id: org.auditor.id },
      ruleset: { versionId: pinned.id, family, version: pinned.version },
      answers: {},
      measurements: {},
      observations: {},
      result: null,
      resultSha256: null,
    });
    expect(pinned.version).toBe('2026.2');
    const events = await auditActions(id);
    expect(events).toEqual([
      expect.objectContaining({ action: 'assessment.created', actor_user_id: org.auditor.id }),
    ]);
    expect(events[0]?.detail).toMatchObject({ family, version: pinned.version, gateId: dir.gateId });
  });

  it('serves the row version as an ETag', async () => {
    const res = await auditor.json('GET', `/api/assessments/${id}`);
    expect(res.status).toBe(200);
    expect(res.headers.get('etag')).toBe('"1"');
  });

  it('saves answers, measurements and observations as a merge patch over the row version', async () => {
    const res = await patch(auditor, id, 1, {
      answers: {
        latchFitted: { value: 'yes' },
        placardsLegible: { value: 'no', note: 'Faded on the street side' },
        wireGaugeAwg: { value: 'awg14' },
      },
      measurements: { hingeGapMm: { value: 4, unit: 'in' }, placardsSide1: { value: 1, unit: 'count' } },
      observations: { site: siteContext },
    });
    expect(res.status).toBe(200);
    expect(res.headers.get('etag')).toBe('"2"');
    const saved = await res.json();
    expect(saved.rowVersion).toBe(2);
    // 4 in = 101.6 mm exactly (NIST SP 811).
    expect(saved.measurements.hingeGapMm).toEqual({ value: 4, unit: 'in', canonical: 101.6 });
    expect(saved.answers.placardsLegible).toEqual({ value: 'no', note: 'Faded on the street side' });

    const second = await patch(auditor, id, 2, {
      answers: { latchFitted: null, ownerShown: { value: 'na' } },
      observations: { site: { publicAccess: true } },
    });
    expect(second.status).toBe(200);
    const merged = await second.json();
    expect(Object.keys(merged.answers).sort()).toEqual(['ownerShown', 'placardsLegible', 'wireGaugeAwg']);
    expect(merged.observations.site).toEqual({ ...siteContext, publicAccess: true });
    expect(merged.rowVersion).toBe(3);
  });

  it('checks each answer against the pinned version’s questions, naming the field', async () => {
    const cases: [unknown, string][] = [
      [{ answers: { latchFitted: { value: 'maybe' } } }, 'answers.latchFitted.value'],
      [{ answers: { wireGaugeAwg: { value: 'awg99' } } }, 'answers.wireGaugeAwg.value'],
      [{ answers: { notAQuestionHere: { value: 'yes' } } }, 'answers.notAQuestionHere'],
      [{ answers: { hingeGapMm: { value: 'yes' } } }, 'answers.hingeGapMm'],
      [{ measurements: { hingeGapMm: { value: 4, unit: 'N' } } }, 'measurements.hingeGapMm.unit'],
      [
        { measurements: { hingeGapMm: { value: 4, unit: 'in', canonical: 100 } } },
        'measurements.hingeGapMm.canonical',
      ],
      [{ measurements: { latchFitted: { value: 1, unit: 'count' } } }, 'measurements.latchFitted'],
      [{ observations: { site: { publicAccess: 'often' } } }, 'observations.site.publicAccess'],
      [
        { observations: { entrapment: { zones: [{ zone: 'moat', direction: 'closing' }], devices: [] } } },
        'observations.entrapment.zones.0.zone',
      ],
    ];
    for (const [body, field] of cases) {
      const res = await patch(auditor, id, 3, body);
      expect(res.status, field).toBe(422);
      const problem = await res.json();
      expect(
        problem.errors.map((e: { field: string }) => e.field),
        field,
      ).toContain(field);
    }
    expect((await testDb()('assessments').where({ id }).first('row_version')).row_version).toBe(3);
  });

  it('needs If-Match: 428 without it, 400 when it is not an ETag', async () => {
    const missing = await patch(auditor, id, null, { purpose: 'service' });
    expect(missing.status).toBe(428);
    const garbled = await auditor.fetch(`/api/assessments/${id}`, {
      method: 'PATCH',
      headers: { 'content-type': 'application/json', 'if-match': '*' },
      body: JSON.stringify({ purpose: 'service' }),
    });
    expect(garbled.status).toBe(400);
    expect((await garbled.json()).errors).toEqual([expect.objectContaining({ field: 'If-Match' })]);
  });

  it("lets the office edit anyone's draft, but not another auditor", async () => {
    expect((await patch(auditor2, id, 3, { purpose: 'service' })).status).toBe(403);
    const byOffice = await patch(office, id, 3, { purpose: 'service' });
    expect(byOffice.status).toBe(200);
    expect((await byOffice.json()).purpose).toBe('service');
  });

  it('submits: scores with the pinned version and stores the result with the engine’s SHA-256', async () => {
    const res = await auditor.fetch(`/api/assessments/${id}/submit`, {
      method: 'POST',
      headers: { 'if-match': '"4"', accept: 'application/json' },
    });
    expect(res.status, await res.clone().text()).toBe(200);
    expect(res.headers.get('etag')).toBe('"5"');
    const scored = await res.json();
    expect(scored.status).toBe('scored');
    expect(VERDICTS).toContain(scored.verdict);
    expect(scored.result.verdict).toBe(scored.verdict);
    expect(scored.result.findings.length).toBeGreaterThan(0);
    expect(scored.result.ruleset).toMatchObject({ family, version: '2026.2' });
    expect(scored.submittedAt).not.toBeNull();
    expect(scored.gateSnapshot).toMatchObject({
      id: dir.gateId,
      kind: 'swing',
      widthMm: 3660,
      site: { id: dir.siteId, usageClass: 2 },
    });

    const stored = await testDb()('assessments')
      .where({ id })
      .first(
        'result',
        'result_sha256',
        'verdict',
        'status',
        'answers',
        'measurements',
        'observations',
        'ruleset_version_id',
      );
    expect(stored.result_sha256).toMatch(/^[0-9a-f]{64}$/);
    // What jsonb kept hashes to what was stored…
    expect(resultSha256(stored.result)).toBe(stored.result_sha256);
    // …and the engine, run again on the same gate, documents and version, gives the same bytes.
    const version = await testDb()('ruleset_versions')
      .where({ id: stored.ruleset_version_id })
      .first('content', 'content_sha256');
    const gate = (await (await auditor.json('GET', `/api/gates/${dir.gateId}`)).json()) as Parameters<
      typeof buildEngineInput
    >[0];
    const input = buildEngineInput({ ...gate, usageClass: 2 }, stored);
    if (!input.ok) throw new Error(JSON.stringify(input.errors));
    const again = scoreParsed(input.value, {
      version: version.content as RulesetVersion,
      contentSha256: version.content_sha256,
    });
    expect(resultSha256(again)).toBe(stored.result_sha256);
  });

  it('refuses a second submit, and any edit, once scored', async () => {
    const again = await auditor.json('POST', `/api/assessments/${id}/submit`);
    expect(again.status).toBe(409);
    const edit = await patch(owner, id, 5, { purpose: 'handover' });
    expect(edit.status).toBe(409);
    expect((await edit.json()).current).toMatchObject({ id, status: 'scored', rowVersion: 5 });
    expect((await owner.json('DELETE', `/api/assessments/${id}`)).status).toBe(409);
  });

  it('wrote audit events for create and submit, and the audit chain still verifies', async () => {
    const events = await auditActions(id);
    expect(events.map((e) => e.action)).toEqual(['assessment.created', 'assessment.submitted']);
    const stored = await testDb()('assessments').where({ id }).first('result_sha256', 'verdict');
    expect(events[1]?.detail).toMatchObject({
      resultSha256: stored.result_sha256,
      verdict: stored.verdict,
      family,
      version: '2026.2',
    });
    // Only this organisation's part: another file may be testing a deliberately broken event elsewhere.
    expect((await verifyOrganisationTrail(org.id, testDb())).ok).toBe(true);
  });

  it('keeps a scored record fixed in the database itself', async () => {
    await expect(
      testDb()('assessments')
        .where({ id })
        .update({ verdict: 'clear', result_sha256: '0'.repeat(64) }),
    ).rejects.toThrow(/scored record cannot change/);
    await expect(testDb()('assessments').where({ id }).delete()).rejects.toThrow(/cannot be deleted/);
  });
});

describe('starting and submitting, refused', () => {
  it('refuses an unknown family, a foreign gate, and an auditor starting for someone else', async () => {
    const unknownFamily = await owner.json('POST', '/api/assessments', {
      gateId: dir.gateId,
      family: 'no-such-family',
      purpose: 'service',
    });
    expect((await unknownFamily.json()).errors).toEqual([
      { field: 'family', message: expect.stringMatching(/no published version/) },
    ]);
    const foreignGate = await otherOwner.json('POST', '/api/assessments', {
      gateId: dir.gateId,
      family,
      purpose: 'service',
    });
    expect(foreignGate.status).toBe(422);
    expect((await foreignGate.json()).errors).toEqual([{ field: 'gateId', message: expect.any(String) }]);
    const forSomeoneElse = await auditor.json('POST', '/api/assessments', {
      gateId: dir.gateId,
      family,
      purpose: 'service',
      auditorId: org.auditor2.id,
    });
    expect(forSomeoneElse.status).toBe(403);
  });

  it('lets the office start a draft for an auditor', async () => {
    const draft = await startDraft(office, dir.gateId, { auditorId: org.auditor2.id });
    expect(draft.auditor.id).toBe(org.auditor2.id);
    expect((await patch(auditor2, draft.id, 1, { purpose: 'handover' })).status).toBe(200);
  });

  it('says what is missing before it can be scored', async () => {
    const siteId = await insertSite(org.id, dir.clientId);
    const gateId = await insertGate(org.id, siteId, { operator: JSON.stringify({ mounting: 'post' }) });
    const draft = await startDraft(auditor, gateId);
    const res = await auditor.json('POST', `/api/assessments/${draft.id}/submit`);
    expect(res.status).toBe(422);
    const fields = (await res.json()).errors.map((e: { field: string }) => e.field);
    expect(fields).toEqual(
      expect.arrayContaining([
        'gate.operator.listed',
        'gate.operator.automaticClosing',
        'observations.site.pedestriansUseDriveway',
      ]),
    );
    expect((await testDb()('assessments').where({ id: draft.id }).first('status')).status).toBe('draft');
  });

  it('discards a draft, audited', async () => {
    const draft = await startDraft(auditor);
    expect((await auditor2.json('DELETE', `/api/assessments/${draft.id}`)).status).toBe(403);
    expect((await auditor.json('DELETE', `/api/assessments/${draft.id}`)).status).toBe(204);
    expect((await auditActions(draft.id)).map((e) => e.action)).toEqual([
      'assessment.created',
      'assessment.discarded',
    ]);
  });
});

describe('the assessment list', () => {
  let scoredId: string;
  let draftId: string;

  beforeAll(async () => {
    const siteId = await insertSite(org.id, dir.clientId);
    const slideGate = await insertGate(org.id, siteId, {
      kind: 'slide',
      leaves: 'single',
      opening_direction: null,
    });
    const draft = await startDraft(auditor2, slideGate, { visitedOn: '2026-03-10T16:00:00Z' });
    draftId = draft.id;
    const toScore = await startDraft(auditor, dir.homeGateId, { visitedOn: '2026-03-12T09:30:00Z' });
    scoredId = toScore.id;
    expect((await patch(auditor, scoredId, 1, { observations: { site: siteContext } })).status).toBe(200);
    expect((await auditor.json('POST', `/api/assessments/${scoredId}/submit`)).status).toBe(200);
  });

  const ids = async (client: TestClient, query: string) => {
    const res = await client.json('GET', `/api/assessments?${query}`);
    expect(res.status, query).toBe(200);
    return (await res.json()).items.map((a: { id: string }) => a.id);
  };

  it('filters by status, verdict, gate kind, auditor, gate, site, client and visit dates', async () => {
    const scored = await testDb()('assessments').where({ id: scoredId }).first('verdict');
    expect(await ids(owner, 'status=scored&pageSize=100')).toContain(scoredId);
    expect(await ids(owner, 'status=scored&pageSize=100')).not.toContain(draftId);
    expect(await ids(owner, `verdict=${scored.verdict}&pageSize=100`)).toContain(scoredId);
    expect(await ids(owner, 'gateKind=slide')).toEqual([draftId]);
    expect(await ids(owner, `auditorId=${org.auditor2.id}&gateKind=slide`)).toEqual([draftId]);
    expect(await ids(owner, `gateId=${dir.homeGateId}`)).toEqual([scoredId]);
    expect(await ids(owner, `clientId=${org.clientId}`)).toEqual([scoredId]);
    // Dates are days in the organisation's time zone (UTC for the fixture).
    expect(await ids(owner, 'from=2026-03-10&to=2026-03-10')).toEqual([draftId]);
    expect(await ids(owner, 'from=2026-03-10&to=2026-03-12&sort=visitedOn')).toEqual([draftId, scoredId]);
    expect(await ids(owner, 'from=2026-03-11&to=2026-03-11')).toEqual([]);
  });

  it('pages in a stable order', async () => {
    const all = await ids(owner, 'sort=-createdAt&pageSize=100');
    const paged: string[] = [];
    for (let page = 1; page <= Math.ceil(all.length / 2); page++)
      paged.push(...(await ids(owner, `sort=-createdAt&pageSize=2&page=${page}`)));
    expect(paged).toEqual(all);
  });

  it('shows a homeowner only what was sent to their client for signature', async () => {
    expect(await ids(homeowner, '')).toEqual([]);
    expect((await homeowner.json('GET', `/api/assessments/${scoredId}`)).status).toBe(404);
    await testDb()('assessments').where({ id: scoredId }).update({ status: 'awaiting_signature' });
    expect(await ids(homeowner, '')).toEqual([scoredId]);
    expect((await homeowner.json('GET', `/api/assessments/${scoredId}`)).status).toBe(200);
    expect((await homeowner.json('GET', `/api/assessments/${draftId}`)).status).toBe(404);
  });

  it("shows another organisation nothing of this one's", async () => {
    expect(await ids(otherOwner, 'pageSize=100')).toEqual([]);
    expect((await otherOwner.json('GET', `/api/assessments/${scoredId}`)).status).toBe(404);
  });
});
