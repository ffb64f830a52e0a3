/**
 * The ruleset pages as people open them: the list of families, one version in plain words, the
 * readable diff, and the owner's amendment editor (reached by the "Amend" form, no script).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  signInHomeowner,
  saveOrganisationSettings,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';

const NA = 'north-american-gate';

let org: FixtureOrganisation;
let owner: TestClient;
let auditor: TestClient;
let homeowner: TestClient;

beforeAll(async () => {
  org = await createOrganisation('rulesets-pages');
  [owner, auditor, homeowner] = await Promise.all([
    signIn(org.owner.email, fixturePassword),
    signIn(org.auditor.email, fixturePassword),
    signInHomeowner(org.homeowner.email),
  ]);
});

const page = async (client: TestClient, path: string) => {
  const res = await client.fetch(path, { headers: { accept: 'text/html' } });
  return { status: res.status, html: await res.text(), location: res.headers.get('location') };
};

/** Text of the page with tags stripped and entities for quotes undone, for reading sentences. */
const textOf = (html: string) =>
  html
    .replace(/<[^>]+>/g, ' ')
    .replace(/&#39;|&#x27;/g, "'")
    .replace(/&quot;/g, '"')
    .replace(/&amp;/g, '&')
    .replace(/\s+/g, ' ');

describe('ruleset pages', () => {
  it('lists the shipped families and their versions; only the owner is offered "Amend"', async () => {
    const forAuditor = await page(auditor, '/rulesets');
    expect(forAuditor.status).toBe(200);
    expect(textOf(forAuditor.html)).toContain('North American automated vehicular gates');
    expect(textOf(forAuditor.html)).toContain('2015.1');
    expect(forAuditor.html).not.toContain('>Amend<');
    const forOwner = await page(owner, '/rulesets');
    expect(forOwner.html).toContain('>Amend<');
  });

  it('shows a version readably: rules by hazard area with what passes in plain words, limits in the organisation units, and its questions', async () => {
    const { status, html } = await page(auditor, `/rulesets/${NA}/2026.1`);
    expect(status).toBe(200);
    const text = textOf(html);
    expect(text).toContain('Pinch and crush points');
    expect(text).toContain('fixed object clearance is at least 406.4 mm');
    expect(text).toContain('Caution for the homeowner');
    expect(text).toContain('ASTM F2200');
    expect(text).toContain('How many warning placards can you read standing on the street side of the gate?');
    expect(html).toContain('id="rule-pinch.fixed-objects"');
  });

  it('reads limits in feet and inches to an imperial organisation: 1828.8 mm is "6 ft"', async () => {
    await saveOrganisationSettings(owner, org.id, { displayUnits: 'imperial' });
    try {
      const text = textOf((await page(auditor, `/rulesets/${NA}/2026.1`)).html);
      expect(text).toContain('fixed object clearance is at least 16 in');
      expect(text).toMatch(/min distance: 6 ft/);
      expect(text).not.toContain('1828.8 mm');
      expect(text).not.toContain('406.4 mm');
    } finally {
      await saveOrganisationSettings(owner, org.id, { displayUnits: 'metric' });
    }
  });

  it('shows which band a value exactly on an HRN band edge falls in, and the re-inspection plan', async () => {
    // HRN bands as widely reprinted (secondary source); the edge convention and intervals are the version's (common practice, no source)
    const newer = textOf((await page(auditor, `/rulesets/${NA}/2026.2`)).html);
    expect(newer).toContain('A value exactly on an edge falls in the higher band');
    expect(newer).toContain('from 50 up to but not including 100');
    expect(newer).toContain('Withdraw: when the fixes are reported');
    const older = textOf((await page(auditor, `/rulesets/${NA}/2026.1`)).html);
    expect(older).toContain('A value exactly on an edge falls in the lower band');
  });

  it('answers 404 for a version that does not exist', async () => {
    expect((await page(auditor, `/rulesets/${NA}/1999.1`)).status).toBe(404);
  });

  it('shows the readable diff between the two shipped North American versions', async () => {
    const { status, html } = await page(homeowner, `/rulesets/${NA}/diff?from=2015.1&to=2026.1`);
    expect(status).toBe(200);
    const text = textOf(html);
    // Rules are named by their titles, not their ids.
    expect(text).toContain('Slide gate screened high enough');
    expect(text).not.toContain('gaps.slide-screen-height');
    expect(text).toMatch(/was 1219\.2 mm now 1828\.8 mm/);
    expect(text).toContain('Two independent means of entrapment protection while closing');
  });

  it('lets the owner start an amendment from the list and opens the editor; others are refused the editor', async () => {
    const form = new URLSearchParams({ fromFamily: NA, fromVersion: '2026.1' });
    const res = await owner.fetch('/rulesets', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
      body: form,
    });
    expect(res.status).toBe(303);
    const location = res.headers.get('location') ?? '';
    expect(location).toBe(`/rulesets/${NA}-local/2026.1-local.1/edit`);
    const editor = await page(owner, location);
    expect(editor.status).toBe(200);
    expect(editor.html).toContain('astro-island');
    expect(textOf(editor.html)).toContain('Add a local requirement');
    expect((await page(auditor, location)).status).toBe(403);
    const refused = await auditor.fetch('/rulesets', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
      body: form,
    });
    expect(refused.status).toBe(403);
  });

  it('shows each caution as the homeowner reads it, without the disclaimer sentence, on the version page and in the editor', async () => {
    const caution = 'Nobody should be able to work the gate while standing where it moves.';
    const disclaimer = 'This assessment supports, and never replaces';
    const version = textOf((await page(owner, `/rulesets/${NA}/2026.1`)).html);
    expect(version).toContain(caution);
    expect(version).not.toContain(disclaimer);
    const editor = await page(owner, `/rulesets/${NA}-local/2026.1-local.1/edit`);
    expect(editor.status).toBe(200);
    const text = textOf(editor.html);
    expect(text).toContain(`Homeowner: ${caution}`);
    expect(text).not.toContain(disclaimer);
  });
});
