/**
 * The ruleset API as the walk-through and the office use it: scoring previews against the
 * current or a named version, the list of families, one whole version, and the difference
 * between two versions. Errors are problem details naming the field at fault.
 */
import fs from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { loadRulesetFile, score } from '../../src/lib/rules';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  signInHomeowner,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { slideGateInput, swingGateInput } from './support/gate-inputs';

const NA = 'north-american-gate';
const shipped = (version: string) =>
  loadRulesetFile(
    JSON.parse(fs.readFileSync(path.resolve(__dirname, `../../rulesets/${NA}/${version}.json`), 'utf8')),
  );

interface Finding {
  ruleId: string;
  outcome: string;
  severity: string;
  observed: Record<string, unknown>;
  params: Record<string, { value: unknown; unit?: string }>;
  hrn?: { value: number; band: string };
}

let org: FixtureOrganisation;
let auditor: TestClient;
let office: TestClient;
let homeowner: TestClient;

beforeAll(async () => {
  org = await createOrganisation('rulesets-api');
  [auditor, office, homeowner] = await Promise.all([
    signIn(org.auditor.email, fixturePassword),
    signIn(org.office.email, fixturePassword),
    signInHomeowner(org.homeowner.email),
  ]);
});

const findingOf = (result: { findings: Finding[] }, ruleId: string) => {
  const finding = result.findings.find((f) => f.ruleId === ruleId);
  if (!finding) throw new Error(`no finding for ${ruleId}`);
  return finding;
};

describe('POST /api/score', () => {
  it('scores a swing gate against the current version: findings, area scores, HRN on each failure and a verdict', async () => {
    const res = await auditor.json('POST', '/api/score', { family: NA, input: swingGateInput() });
    expect(res.status).toBe(200);
    const result = await res.json();
    expect(result.ruleset).toEqual({
      family: NA,
      version: '2026.2',
      contentSha256: shipped('2026.2').contentSha256,
    });
    // ASTM F2200, swing gates: 16 in (406.4 mm) to fixed objects; the open leaf stops 12 in from the pier.
    const fixedObjects = findingOf(result, 'pinch.fixed-objects');
    expect(fixedObjects).toMatchObject({
      outcome: 'fail',
      severity: 'critical',
      observed: { 'm.fixedObjectClearanceMm': 304.8 },
      params: { minClearanceMm: { value: 406.4, unit: 'mm' } },
    });
    expect(result.verdict).toBe('withdraw');
    const failing: Finding[] = result.findings.filter((f: Finding) => f.outcome === 'fail');
    expect(failing.length).toBeGreaterThanOrEqual(2);
    for (const f of failing)
      expect(f.hrn, f.ruleId).toMatchObject({ value: expect.any(Number), band: expect.any(String) });
    for (const f of result.findings.filter((x: Finding) => x.outcome !== 'fail'))
      expect(f.hrn, f.ruleId).toBeUndefined();
    expect(Object.keys(result.areaScores).sort()).toEqual([
      'build',
      'controls',
      'force',
      'gaps',
      'handover',
      'pinch',
      'power',
      'sensing',
      'signage',
    ]);
    for (const value of Object.values(result.areaScores))
      if (value !== null) expect(value).toBeGreaterThanOrEqual(0);
    expect(result.needsInfo.length).toBeGreaterThan(0);
  });

  it('scores a slide gate: a 4 in opening in the bottom 72 in fails the 2-1/4 in sphere', async () => {
    const res = await office.json('POST', '/api/score', { family: NA, input: slideGateInput() });
    expect(res.status).toBe(200);
    const result = await res.json();
    // ASTM F2200, slide gates: openings must not pass a 2-1/4 in (57.15 mm) sphere.
    expect(findingOf(result, 'gaps.slide-openings')).toMatchObject({
      outcome: 'fail',
      severity: 'critical',
      observed: { 'm.largestOpeningMm': 101.6 },
    });
    expect(findingOf(result, 'gaps.slide-openings').hrn?.value).toBeGreaterThan(0);
    expect(findingOf(result, 'build.slide-positive-stops').outcome).toBe('pass');
    expect(findingOf(result, 'pinch.fixed-objects').outcome).toBe('n/a');
    expect(result.verdict).toBe('withdraw');
    expect(result.areaScores.gaps).toBeLessThan(100);
  });

  it('gives byte-identical results for the same input and version', async () => {
    const first = await (
      await auditor.json('POST', '/api/score', { family: NA, input: swingGateInput() })
    ).text();
    const second = await (
      await auditor.json('POST', '/api/score', { family: NA, input: swingGateInput() })
    ).text();
    expect(second).toBe(first);
  });

  // The version comes from the database (jsonb reorders keys), so the text is compared as data here;
  // tests/unit/rules/result-json.test.ts holds the endpoint's writer to JSON.stringify byte for byte.
  it('answers the result the engine gives, as application/json', async () => {
    for (const [version, input] of [
      ['2026.2', swingGateInput()],
      ['2015.1', slideGateInput()],
    ] as const) {
      const res = await auditor.json('POST', '/api/score', { family: NA, version, input });
      expect(res.status).toBe(200);
      expect(res.headers.get('content-type')).toBe('application/json');
      expect(JSON.parse(await res.text())).toEqual(score(input, shipped(version)));
    }
  });

  it('scores against a named older version when asked', async () => {
    const result = await (
      await auditor.json('POST', '/api/score', { family: NA, version: '2015.1', input: slideGateInput() })
    ).json();
    expect(result.ruleset).toEqual({
      family: NA,
      version: '2015.1',
      contentSha256: shipped('2015.1').contentSha256,
    });
    // The 2015 line screened slide-gate openings to 48 in only; this gate is screened to 72 in either way.
    expect(findingOf(result, 'gaps.slide-screen-height').params.screenHeightMm).toEqual({
      value: 1219.2,
      unit: 'mm',
    });
  });

  it('refuses an input the schema rejects with 422, naming the field under input', async () => {
    const input = swingGateInput();
    const res = await auditor.json('POST', '/api/score', {
      family: NA,
      input: { ...input, profile: { ...input.profile, usageClass: 7 } },
    });
    expect(res.status).toBe(422);
    expect(res.headers.get('content-type')).toMatch(/^application\/problem\+json/);
    const problem = await res.json();
    expect(problem).toMatchObject({ status: 422, title: expect.any(String) });
    expect(problem.errors).toEqual([
      { field: 'input.profile.usageClass', message: expect.stringMatching(/usage class/) },
    ]);
  });

  it("refuses a measurement in the wrong kind of unit for the version's question, naming it", async () => {
    const input = swingGateInput();
    const res = await auditor.json('POST', '/api/score', {
      family: NA,
      input: {
        ...input,
        measurements: { ...input.measurements, placardsSide1: { value: 3, unit: 'mm', canonical: 3 } },
      },
    });
    expect(res.status).toBe(422);
    const problem = await res.json();
    expect(problem.errors).toEqual([
      { field: 'input.measurements.placardsSide1.unit', message: expect.stringContaining('count') },
    ]);
  });

  it('refuses unknown fields, families and versions, each by name', async () => {
    const unknownField = await (
      await auditor.json('POST', '/api/score', { family: NA, input: swingGateInput(), verbose: true })
    ).json();
    expect(unknownField.errors.map((e: { field: string }) => e.field)).toEqual(['verbose']);
    const family = await auditor.json('POST', '/api/score', {
      family: 'no-such-family',
      input: swingGateInput(),
    });
    expect(family.status).toBe(422);
    expect((await family.json()).errors).toEqual([{ field: 'family', message: expect.any(String) }]);
    const version = await auditor.json('POST', '/api/score', {
      family: NA,
      version: '1999.1',
      input: swingGateInput(),
    });
    expect(version.status).toBe(422);
    expect((await version.json()).errors).toEqual([{ field: 'version', message: expect.any(String) }]);
    const badLabel = await auditor.json('POST', '/api/score', {
      family: NA,
      version: 'latest',
      input: swingGateInput(),
    });
    expect((await badLabel.json()).errors.map((e: { field: string }) => e.field)).toEqual(['version']);
  });

  it('is for staff: a homeowner is refused', async () => {
    expect((await homeowner.json('POST', '/api/score', { family: NA, input: swingGateInput() })).status).toBe(
      403,
    );
  });
});

describe('GET /api/rulesets', () => {
  it('lists the shipped families with their versions, the current one and rule counts', async () => {
    const res = await auditor.json('GET', '/api/rulesets');
    expect(res.status).toBe(200);
    const { families } = await res.json();
    const na = families.find((f: { family: string }) => f.family === NA);
    expect(na).toMatchObject({ local: false, current: '2026.2', basedOnFamily: null });
    expect(na.versions.map((v: { version: string }) => v.version)).toEqual(['2026.2', '2026.1', '2015.1']);
    const latest = na.versions[0];
    expect(latest).toMatchObject({
      status: 'published',
      contentSha256: shipped('2026.2').contentSha256,
      ruleCount: shipped('2026.2').version.rules.length,
      effectiveFrom: '2026-12-07',
      derivedFrom: null,
    });
    expect(Date.parse(latest.publishedAt)).not.toBeNaN();
    expect(families.some((f: { family: string }) => f.family === 'european-powered-gate')).toBe(true);
  });

  it('is readable by a homeowner too (published versions only)', async () => {
    const res = await homeowner.json('GET', '/api/rulesets');
    expect(res.status).toBe(200);
    const { families } = await res.json();
    for (const f of families) for (const v of f.versions) expect(v.status).not.toBe('draft');
  });
});

describe('GET /api/rulesets/{family}/{version}', () => {
  it('returns the whole version, questions and rules, with its hash as the ETag', async () => {
    const res = await auditor.json('GET', `/api/rulesets/${NA}/2026.1`);
    expect(res.status).toBe(200);
    const detail = await res.json();
    const file = shipped('2026.1');
    expect(res.headers.get('etag')).toBe(`"${file.contentSha256}"`);
    expect(detail).toMatchObject({
      family: NA,
      version: '2026.1',
      status: 'published',
      local: false,
      familyTitle: file.version.familyTitle,
    });
    expect(detail.content.rules.map((r: { id: string }) => r.id)).toEqual(
      file.version.rules.map((r) => r.id),
    );
    expect(detail.content.questions).toHaveLength(file.version.questions.length);
    expect(detail.content.sources.map((s: { id: string }) => s.id)).toContain('ul325');
  });

  it('answers 404 with problem details for an unknown version or a malformed label', async () => {
    for (const p of [
      `/api/rulesets/${NA}/1999.1`,
      `/api/rulesets/${NA}/not-a-version`,
      '/api/rulesets/no-such-family/2026.1',
      '/api/rulesets/Bad_Family/2026.1',
    ]) {
      const res = await auditor.json('GET', p);
      expect(res.status, p).toBe(404);
      expect(res.headers.get('content-type'), p).toMatch(/^application\/problem\+json/);
    }
  });
});

describe('GET /api/rulesets/{family}/diff', () => {
  it('shows what changed between the two shipped North American versions', async () => {
    const res = await auditor.json('GET', `/api/rulesets/${NA}/diff?from=2015.1&to=2026.1`);
    expect(res.status).toBe(200);
    const diff = await res.json();
    expect(diff.from).toEqual({ family: NA, version: '2015.1' });
    expect(diff.to).toEqual({ family: NA, version: '2026.1' });
    // UL 325 (2016 revision): two independent means of entrapment protection replace primary + secondary.
    expect(diff.rules.added.map((r: { id: string }) => r.id)).toContain('sensing.closing-two-means');
    expect(diff.rules.removed.map((r: { id: string }) => r.id)).toContain(
      'sensing.closing-primary-secondary',
    );
    // ASTM F2200: slide-gate openings screened to 72 in instead of 48 in.
    const screen = diff.rules.changed.find((c: { id: string }) => c.id === 'gaps.slide-screen-height');
    expect(screen.changes).toContainEqual({ field: 'params.screenHeightMm', from: 1219.2, to: 1828.8 });
    expect(diff.questions.changed.map((q: { id: string }) => q.id)).toContain('largestOpeningMm');
    expect(diff.version).toContainEqual(
      expect.objectContaining({ field: 'effectiveFrom', from: '2015-01-01', to: '2026-01-01' }),
    );
  });

  it('reads an empty diff when both ends are the same version', async () => {
    const diff = await (await auditor.json('GET', `/api/rulesets/${NA}/diff?from=2026.1&to=2026.1`)).json();
    expect(diff.rules).toEqual({ added: [], removed: [], changed: [] });
    expect(diff.questions).toEqual({ added: [], removed: [], changed: [] });
  });

  it('names a missing or malformed query parameter, and 404s an unknown version', async () => {
    const missing = await auditor.json('GET', `/api/rulesets/${NA}/diff?from=2015.1`);
    expect(missing.status).toBe(400);
    expect((await missing.json()).errors.map((e: { field: string }) => e.field)).toEqual(['to']);
    const extra = await auditor.json('GET', `/api/rulesets/${NA}/diff?from=2015.1&to=2026.1&colour=red`);
    expect((await extra.json()).errors.map((e: { field: string }) => e.field)).toEqual(['colour']);
    expect((await auditor.json('GET', `/api/rulesets/${NA}/diff?from=2015.1&to=2031.1`)).status).toBe(404);
  });
});
