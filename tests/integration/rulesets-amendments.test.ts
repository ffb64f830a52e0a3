/**
 * Local amendments end to end: an owner derives a draft from a shipped version, changes a
 * threshold (and a gate's result changes with it), is refused an invalid edit with nothing
 * stored, adds a local requirement with its own reference, publishes, and from then on the
 * version never changes while scoring against the local family reflects every amendment.
 * Another organisation sees none of it.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  signInHomeowner,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { swingGateInput } from './support/gate-inputs';

const NA = 'north-american-gate';
const LOCAL = `${NA}-local`;

interface Finding {
  ruleId: string;
  outcome: string;
  severity: string;
  local?: true;
  reference: { standard: string; clause: string };
}
interface Detail {
  family: string;
  version: string;
  status: string;
  contentSha256: string;
  derivedFrom: { family: string; version: string } | null;
  content: {
    derivedFrom?: { family: string; version: string; contentSha256: string };
    rules: {
      id: string;
      severity: string;
      enabled: boolean;
      local?: true;
      params: Record<string, { value: unknown; unit?: string }>;
      reference: { source?: string };
    }[];
    questions: { key: string; answerType: string }[];
    sources: { id: string; kind: string; title: string }[];
  };
}

let org: FixtureOrganisation;
let other: FixtureOrganisation;
let owner: TestClient;
let office: TestClient;
let auditor: TestClient;
let homeowner: TestClient;
let otherOwner: TestClient;
let draft: Detail;
let draftPath: string;

const fireSwitch = {
  title: 'Fire service key switch at the gate',
  area: 'controls',
  severity: 'major',
  gateKinds: ['swing', 'slide'],
  check: {
    kind: 'answer_yes',
    question: {
      section: 'controls',
      prompt: 'Is a fire service key switch fitted at the gate and does it open the gate?',
      whyItMatters: 'Fire crews must get through a closed gate without waiting for anyone.',
    },
  },
  harm: 'fatality',
  remediation:
    'Fit the key switch the fire service specifies beside the entry lane and check it opens the gate.',
  caution:
    'The fire service needs to open this gate in an emergency. Do not remove or disable the key switch.',
  reference: {
    standard: 'Eastholm County fire code',
    clause: '§ 5.12 Emergency access through powered gates',
  },
};

const findingOf = (result: { findings: Finding[] }, ruleId: string) =>
  result.findings.find((f) => f.ruleId === ruleId);

async function stored(): Promise<{ content_sha256: string; status: string }> {
  return testDb()('ruleset_versions as rv')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .where({ 'r.organisation_id': org.id, 'r.family': LOCAL, 'rv.version': draft.version })
    .first('rv.content_sha256', 'rv.status');
}

async function auditCount(action: string): Promise<number> {
  const [{ count }] = await testDb()('audit_events')
    .where({ organisation_id: org.id, action })
    .count({ count: '*' });
  return Number(count);
}

beforeAll(async () => {
  [org, other] = await Promise.all([
    createOrganisation('amendments'),
    createOrganisation('amendments-other'),
  ]);
  [owner, office, auditor, homeowner, otherOwner] = await Promise.all([
    signIn(org.owner.email, fixturePassword),
    signIn(org.office.email, fixturePassword),
    signIn(org.auditor.email, fixturePassword),
    signInHomeowner(org.homeowner.email),
    signIn(other.owner.email, fixturePassword),
  ]);
});

describe('the amendment flow', () => {
  it('derives a draft in the organisation’s own family, copied from the shipped version with derivedFrom set', async () => {
    const shipped = await (await owner.json('GET', `/api/rulesets/${NA}/2026.1`)).json();
    const res = await owner.json('POST', '/api/rulesets/amendments', {
      fromFamily: NA,
      fromVersion: '2026.1',
    });
    expect(res.status).toBe(201);
    draft = await res.json();
    draftPath = `/api/rulesets/${LOCAL}/${draft.version}`;
    expect(res.headers.get('location')).toBe(draftPath);
    expect(draft).toMatchObject({
      family: LOCAL,
      version: '2026.1-local.1',
      status: 'draft',
      local: true,
      derivedFrom: { family: NA, version: '2026.1' },
    });
    expect(draft.content.derivedFrom).toEqual({
      family: NA,
      version: '2026.1',
      contentSha256: shipped.contentSha256,
    });
    expect(draft.content.rules).toEqual(shipped.content.rules);
    expect(await auditCount('ruleset.amendment.derived')).toBe(1);
  });

  it('changes a threshold (value only, the unit stays) and the gate’s result changes with it', async () => {
    const before = await (
      await auditor.json('POST', '/api/score', {
        family: LOCAL,
        version: draft.version,
        input: swingGateInput(),
      })
    ).json();
    expect(findingOf(before, 'pinch.fixed-objects')?.outcome).toBe('fail');

    const res = await owner.json('PATCH', draftPath, {
      rules: { 'pinch.fixed-objects': { params: { minClearanceMm: 300 } } },
    });
    expect(res.status).toBe(200);
    draft = await res.json();
    expect(
      draft.content.rules.find((r) => r.id === 'pinch.fixed-objects')?.params.minClearanceMm,
    ).toMatchObject({ value: 300, unit: 'mm' });

    // The pier is 12 in (304.8 mm) from the open leaf: enough under a 300 mm local threshold.
    const after = await (
      await auditor.json('POST', '/api/score', {
        family: LOCAL,
        version: draft.version,
        input: swingGateInput(),
      })
    ).json();
    expect(findingOf(after, 'pinch.fixed-objects')?.outcome).toBe('pass');
    expect(after.ruleset.contentSha256).toBe(draft.contentSha256);
    expect(after.verdict).not.toBe('withdraw');
  });

  it('refuses an edit of the wrong type with 422 naming the field, and stores nothing', async () => {
    const before = await stored();
    const edits = await auditCount('ruleset.amendment.edited');
    const res = await owner.json('PATCH', draftPath, {
      rules: {
        'pinch.fixed-objects': { params: { minClearanceMm: 'wide' } },
        'signage.placards-each-side': { enabled: false },
      },
    });
    expect(res.status).toBe(422);
    const problem = await res.json();
    expect(problem.errors).toEqual([
      {
        field: 'rules.pinch.fixed-objects.params.minClearanceMm',
        message: expect.stringContaining('number in mm'),
        ruleId: 'pinch.fixed-objects',
      },
    ]);
    expect(await stored()).toEqual(before);
    expect(await auditCount('ruleset.amendment.edited')).toBe(edits);
  });

  it('refuses a local rule that makes the ruleset invalid, listing each problem with its path in the document', async () => {
    const before = await stored();
    const res = await owner.json('PATCH', draftPath, {
      rules: { 'signage.placards-each-side': { enabled: false } },
      addRules: [
        {
          ...fireSwitch,
          title: 'Gate colour',
          check: {
            kind: 'condition',
            condition: { '==': [{ var: 'answers.gateColour' }, 'red'] },
            requires: ['answers.gateColour'],
          },
        },
      ],
    });
    expect(res.status).toBe(422);
    const { errors } = await res.json();
    const index = draft.content.rules.length;
    expect(errors.length).toBeGreaterThan(0);
    for (const e of errors)
      expect(e).toMatchObject({
        field: expect.stringMatching(new RegExp(`^ruleset\\.rules\\[${index}\\]`)),
        ruleId: 'local.gate-colour',
      });
    expect(errors.map((e: { message: string }) => e.message).join(' ')).toContain('answers.gateColour');
    expect(await stored()).toEqual(before);
  });

  it('refuses to remove a shipped rule (it can be turned off) or to change a rule or param that does not exist', async () => {
    const res = await owner.json('PATCH', draftPath, {
      removeRules: ['pinch.fixed-objects'],
      rules: {
        'pinch.no-such-rule': { enabled: false },
        'pinch.operator-arm': { params: { maxWidthMm: 3 } },
      },
    });
    expect(res.status).toBe(422);
    const fields = (await res.json()).errors.map((e: { field: string }) => e.field);
    expect(fields).toEqual([
      'removeRules[0]',
      'rules.pinch.no-such-rule',
      'rules.pinch.operator-arm.params.maxWidthMm',
    ]);
  });

  it('adds a local requirement with its own reference, turns a rule off and changes a severity', async () => {
    const res = await owner.json('PATCH', draftPath, {
      rules: {
        'signage.placards-each-side': { enabled: false },
        'handover.remote-codes': { severity: 'major' },
      },
      addRules: [fireSwitch],
    });
    expect(res.status).toBe(200);
    draft = await res.json();
    const local = draft.content.rules.find((r) => r.id === 'local.fire-service-key-switch-at-the-gate');
    expect(local).toMatchObject({ local: true, enabled: true, severity: 'major' });
    const source = draft.content.sources.find((s) => s.id === local?.reference.source);
    expect(source).toMatchObject({ kind: 'local', title: 'Eastholm County fire code' });
    expect(draft.content.questions.map((q) => q.key)).toContain('localFireServiceKeySwitchAtTheGate');
    expect(draft.content.rules.find((r) => r.id === 'signage.placards-each-side')?.enabled).toBe(false);
    expect(draft.content.rules.find((r) => r.id === 'handover.remote-codes')?.severity).toBe('major');
  });

  it('shows the diff against the version it was derived from', async () => {
    const res = await owner.json(
      'GET',
      `/api/rulesets/${LOCAL}/diff?fromFamily=${NA}&from=2026.1&to=${draft.version}`,
    );
    expect(res.status).toBe(200);
    const diff = await res.json();
    expect(diff.rules.added).toEqual([
      { id: 'local.fire-service-key-switch-at-the-gate', title: fireSwitch.title },
    ]);
    expect(diff.rules.removed).toEqual([]);
    const changed = Object.fromEntries(
      diff.rules.changed.map((c: { id: string; changes: unknown[] }) => [c.id, c.changes]),
    );
    expect(changed['pinch.fixed-objects']).toEqual([
      { field: 'params.minClearanceMm', from: 406.4, to: 300 },
    ]);
    expect(changed['signage.placards-each-side']).toEqual([{ field: 'enabled', from: true, to: false }]);
    expect(changed['handover.remote-codes']).toEqual([{ field: 'severity', from: 'minor', to: 'major' }]);
    expect(diff.questions.added.map((q: { id: string }) => q.id)).toEqual([
      'localFireServiceKeySwitchAtTheGate',
    ]);
  });

  it('removes a local rule again, with the question and source only it used', async () => {
    const added = await owner.json('PATCH', draftPath, {
      addRules: [
        {
          ...fireSwitch,
          title: 'Knox box beside the keypad',
          reference: { standard: 'Brackenfold borough access rules', clause: '4.2' },
        },
      ],
    });
    expect(added.status).toBe(200);
    const res = await owner.json('PATCH', draftPath, { removeRules: ['local.knox-box-beside-the-keypad'] });
    expect(res.status).toBe(200);
    const after: Detail = await res.json();
    expect(after.content.rules.map((r) => r.id)).not.toContain('local.knox-box-beside-the-keypad');
    expect(after.content.questions.map((q) => q.key)).not.toContain('localKnoxBoxBesideTheKeypad');
    expect(after.content.sources.map((s) => s.title)).not.toContain('Brackenfold borough access rules');
    expect(after.contentSha256).toBe(draft.contentSha256);
  });

  it('is not the office’s or an auditor’s to edit, nor a homeowner’s to see', async () => {
    expect(
      (await office.json('PATCH', draftPath, { rules: { 'pinch.fixed-objects': { enabled: false } } }))
        .status,
    ).toBe(403);
    expect((await auditor.json('POST', `${draftPath}/publish`)).status).toBe(403);
    expect((await auditor.json('GET', draftPath)).status).toBe(200);
    expect((await homeowner.json('GET', draftPath)).status).toBe(404);
  });

  it('publishes the draft with an audit event; from then on PATCH, DELETE and a second publish are refused', async () => {
    const res = await owner.json('POST', `${draftPath}/publish`);
    expect(res.status).toBe(200);
    const published: Detail & { publishedAt: string } = await res.json();
    expect(published).toMatchObject({ status: 'published', contentSha256: draft.contentSha256 });
    expect(Date.parse(published.publishedAt)).not.toBeNaN();
    const [event] = await testDb()('audit_events')
      .where({ organisation_id: org.id, action: 'ruleset.amendment.published' })
      .select('detail', 'actor_user_id');
    expect(event).toMatchObject({
      actor_user_id: org.owner.id,
      detail: { family: LOCAL, version: draft.version, contentSha256: draft.contentSha256 },
    });

    const patch = await owner.json('PATCH', draftPath, {
      rules: { 'pinch.fixed-objects': { params: { minClearanceMm: 100 } } },
    });
    expect(patch.status).toBe(409);
    expect((await patch.json()).detail).toMatch(/published/);
    expect((await owner.json('DELETE', draftPath)).status).toBe(409);
    expect((await owner.json('POST', `${draftPath}/publish`)).status).toBe(409);
    expect(await stored()).toEqual({ content_sha256: draft.contentSha256, status: 'published' });
  });

  it('scores against the local family’s current version with every amendment in force', async () => {
    const input = swingGateInput();
    const res = await auditor.json('POST', '/api/score', {
      family: LOCAL,
      input: { ...input, answers: { ...input.answers, localFireServiceKeySwitchAtTheGate: { value: 'no' } } },
    });
    expect(res.status).toBe(200);
    const result = await res.json();
    expect(result.ruleset).toEqual({
      family: LOCAL,
      version: draft.version,
      contentSha256: draft.contentSha256,
    });
    expect(findingOf(result, 'pinch.fixed-objects')?.outcome).toBe('pass');
    expect(findingOf(result, 'signage.placards-each-side')).toBeUndefined();
    expect(findingOf(result, 'handover.remote-codes')).toMatchObject({ outcome: 'fail', severity: 'major' });
    expect(findingOf(result, 'local.fire-service-key-switch-at-the-gate')).toMatchObject({
      outcome: 'fail',
      local: true,
      reference: { standard: 'Eastholm County fire code', clause: fireSwitch.reference.clause },
    });
  });

  it('lists the local family beside the shipped ones, based on the North American family', async () => {
    const { families } = await (await owner.json('GET', '/api/rulesets')).json();
    const local = families.find((f: { family: string; local: boolean }) => f.family === LOCAL && f.local);
    expect(local).toMatchObject({ basedOnFamily: NA, current: draft.version });
    expect(local.versions[0]).toMatchObject({
      version: draft.version,
      status: 'published',
      localRuleCount: 1,
      derivedFrom: { family: NA, version: '2026.1' },
    });
  });

  it('numbers the next amendment of the same version on, and deletes a draft', async () => {
    const res = await owner.json('POST', '/api/rulesets/amendments', {
      fromFamily: NA,
      fromVersion: '2026.1',
    });
    expect(res.status).toBe(201);
    const next: Detail = await res.json();
    expect(next.version).toBe('2026.1-local.2');
    const deleted = await owner.json('DELETE', `/api/rulesets/${LOCAL}/${next.version}`);
    expect(deleted.status).toBe(204);
    expect((await owner.json('GET', `/api/rulesets/${LOCAL}/${next.version}`)).status).toBe(404);
    expect(await auditCount('ruleset.amendment.deleted')).toBe(1);
  });

  it('derives from the local published version into the same family', async () => {
    const res = await owner.json('POST', '/api/rulesets/amendments', {
      fromFamily: LOCAL,
      fromVersion: draft.version,
    });
    expect(res.status).toBe(201);
    const next: Detail = await res.json();
    expect(next).toMatchObject({
      family: LOCAL,
      version: '2026.1-local.2',
      derivedFrom: { family: LOCAL, version: draft.version },
    });
    expect(next.content.rules.find((r) => r.id === 'pinch.fixed-objects')?.params.minClearanceMm.value).toBe(
      300,
    );
  });

  it('refuses a local family named like a shipped one, and a draft or unknown version as a source', async () => {
    const shippedName = await owner.json('POST', '/api/rulesets/amendments', {
      fromFamily: NA,
      fromVersion: '2026.1',
      family: 'european-powered-gate',
    });
    expect(shippedName.status).toBe(422);
    expect((await shippedName.json()).errors).toEqual([
      { field: 'family', message: expect.stringContaining('shipped family') },
    ]);
    const fromDraft = await owner.json('POST', '/api/rulesets/amendments', {
      fromFamily: LOCAL,
      fromVersion: '2026.1-local.2',
    });
    expect((await fromDraft.json()).errors).toEqual([
      { field: 'fromVersion', message: expect.stringContaining('draft') },
    ]);
    const unknown = await owner.json('POST', '/api/rulesets/amendments', {
      fromFamily: NA,
      fromVersion: '1999.1',
    });
    expect((await unknown.json()).errors.map((e: { field: string }) => e.field)).toEqual(['fromVersion']);
  });

  it('refuses to edit a shipped version', async () => {
    const res = await owner.json('PATCH', `/api/rulesets/${NA}/2026.1`, {
      rules: { 'pinch.fixed-objects': { enabled: false } },
    });
    expect(res.status).toBe(409);
  });
});

describe("another organisation's local family", () => {
  it('is invisible: 404 on read, diff, edit, publish and delete; absent from the list; unknown when scoring', async () => {
    expect((await otherOwner.json('GET', draftPath)).status).toBe(404);
    expect(
      (
        await otherOwner.json(
          'GET',
          `/api/rulesets/${LOCAL}/diff?fromFamily=${NA}&from=2026.1&to=${draft.version}`,
        )
      ).status,
    ).toBe(404);
    expect(
      (await otherOwner.json('PATCH', draftPath, { rules: { 'pinch.fixed-objects': { enabled: false } } }))
        .status,
    ).toBe(404);
    expect((await otherOwner.json('POST', `${draftPath}/publish`)).status).toBe(404);
    expect((await otherOwner.json('DELETE', `/api/rulesets/${LOCAL}/2026.1-local.2`)).status).toBe(404);
    const { families } = await (await otherOwner.json('GET', '/api/rulesets')).json();
    expect(families.map((f: { family: string }) => f.family)).not.toContain(LOCAL);
    const score = await otherOwner.json('POST', '/api/score', { family: LOCAL, input: swingGateInput() });
    expect(score.status).toBe(422);
    expect((await score.json()).errors.map((e: { field: string }) => e.field)).toEqual(['family']);
  });

  it('can hold a family of the same name of its own, unaffected by the first', async () => {
    const res = await otherOwner.json('POST', '/api/rulesets/amendments', {
      fromFamily: NA,
      fromVersion: '2026.1',
    });
    expect(res.status).toBe(201);
    const theirs: Detail = await res.json();
    expect(theirs).toMatchObject({ family: LOCAL, version: '2026.1-local.1', status: 'draft' });
    expect(
      theirs.content.rules.find((r) => r.id === 'pinch.fixed-objects')?.params.minClearanceMm.value,
    ).toBe(406.4);
    expect(theirs.content.rules.some((r) => r.local)).toBe(false);
  });
});
