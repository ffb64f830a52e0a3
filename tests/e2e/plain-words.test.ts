/**
 * What people read is words, not codes, in Debian's chromium: counts agree with their nouns
 * ("1 day", "348 days", never "day(s)"), lists have no stray spaces before commas, dates read as
 * dates, and no page shows a machine string (snake_case codes, rule ids, ruleset family slugs,
 * audit action codes). Screenshots into tests/e2e/screenshots/words-*.png.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createPrng, sampleDocuments, sampleGate } from '../support/archive-samples';
import {
  addClient,
  addGate,
  addSite,
  fileAssessment,
  publishedVersion,
} from '../integration/support/archive';
import { createOrganisation, testDb, type FixtureOrganisation } from '../integration/support/fixtures';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';
import { signInThroughForm } from './support/sign-in';

let org: FixtureOrganisation;
let browser: BrowserSession;
let siteId: string;
let gateId: string;

/** Codes and slips no page may show. */
const machineWords =
  /\b[a-z]+(?:_[a-z]+)+\b|\b[a-z]+\.[a-z]+(?:-[a-z]+)+\b|north-american-gate|european-powered-gate|\(s\)| ,|signed in never|\d{4}-\d{2}-\d{2}/;

/** The page's main text without e-mail addresses (which may hold dots, dashes and underscores). */
async function mainText(): Promise<string> {
  return (await browser.page.locator('main').innerText()).replace(/\S+@\S+/g, '');
}

beforeAll(async () => {
  org = await createOrganisation('plain words');
  const version = await publishedVersion('north-american-gate', '2026.1');
  const prng = createPrng(777);
  const gate = {
    ...sampleGate(prng),
    kind: 'swing' as const,
    openingDirection: 'pull_to_open' as const,
    widthMm: 3500,
    entered: { width: { value: 3500, unit: 'mm' } },
  };
  const client = await addClient(org.id, 'Quenby Almshouses');
  siteId = await addSite(org.id, client, '2 Quenby Row', 'Eastholm', 2);
  gateId = await addGate(org.id, siteId, 'Almshouse gate', gate);
  const lastYear = new Date(Date.now() - 300 * 86_400_000).toISOString();
  await fileAssessment({
    organisationId: org.id,
    auditorId: org.auditor.id,
    gateId,
    gate,
    usageClass: 2,
    version,
    visitedOn: lastYear,
    documents: sampleDocuments(prng, version.loaded.version, 0.85),
  });
  browser = await launchBrowser(inject('baseUrl'));
  await signInThroughForm(browser.page, org.owner.email, `/sites/${siteId}`);
});

afterAll(async () => {
  await browser?.close();
});

describe('plain words on the pages', () => {
  it("lists a site's gate without a stray space before a comma", async () => {
    const { page } = browser;
    await page.goto(`/sites/${siteId}`);
    const line = (await page.locator(`#gate-${gateId} p`).first().innerText()).trim();
    // The width as it was entered on the gate form.
    expect(line).toMatch(/^Swing, (one leaf|two leaves), 3,?500 mm$/);
  });

  it('says when a gate is due in days, with dates as dates and findings without codes', async () => {
    const { page } = browser;
    await page.goto(`/archive/gates/${gateId}`);
    await page.getByRole('heading', { name: 'Next inspection' }).waitFor();
    const text = await mainText();
    expect(text).toMatch(/\(in \d+ days?\)/);
    expect(text).toMatch(/Class II\b/);
    expect(text).not.toMatch(machineWords);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'words-01-gate-history', { fullPage: true });
  });

  it('names each audit event in words', async () => {
    const { page } = browser;
    await page.goto('/archive/audit');
    await page.getByRole('heading', { name: 'Audit trail' }).waitFor();
    const text = await mainText();
    expect(text).toMatch(/Signed in/);
    expect(text).not.toMatch(machineWords);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'words-02-audit-trail', { fullPage: true });
  });

  it('shows re-inspections, the archive, the home page and the staff page without codes or slips', async () => {
    const { page } = browser;
    for (const path of [
      '/archive/reinspection?within=365',
      '/archive',
      '/',
      '/staff',
      '/assessments',
      '/clients',
    ]) {
      await page.goto(path);
      await page.waitForLoadState('networkidle');
      expect(await mainText(), path).not.toMatch(machineWords);
    }
  });
});
