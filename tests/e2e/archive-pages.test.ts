/**
 * The archive's other pages in Debian's chromium, as the owner: a gate's history (trend chart
 * and open findings), the ruleset impact list (computed by the island) and the audit trail with
 * its verification. No serious accessibility violations; screenshots at 360 and 1280 px into
 * tests/e2e/screenshots/archive-*.png.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { scoreParsed } from '../../src/lib/rules';
import { buildEngineInput } from '../../src/lib/server/assessment-input';
import { createPrng, sampleDocuments, sampleGate } from '../support/archive-samples';
import {
  createOrganisation,
  fixturePassword,
  type FixtureOrganisation,
} from '../integration/support/fixtures';
import {
  addClient,
  addGate,
  addSite,
  fileAssessment,
  publishedVersion,
} from '../integration/support/archive';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';

let org: FixtureOrganisation;
let browser: BrowserSession;
let gateId: string;
/** The version the service gates were picked against (a newer one may judge them differently). */
let impactVersionId: string;

beforeAll(async () => {
  org = await createOrganisation('archive-pages');
  const [v2015, v2026] = await Promise.all([
    publishedVersion('north-american-gate', '2015.1'),
    publishedVersion('north-american-gate', '2026.1'),
  ]);
  impactVersionId = v2026.id;
  const prng = createPrng(5150);
  const gate = { ...sampleGate(prng), kind: 'swing' as const, openingDirection: 'pull_to_open' as const };
  const client = await addClient(org.id, 'Marrowfield Court Residents');
  const site = await addSite(org.id, client, '12 Marrowfield Court', 'Eastholm', 2);
  gateId = await addGate(org.id, site, 'Courtyard swing gate', gate);
  const base = { organisationId: org.id, auditorId: org.auditor.id, gateId, gate, usageClass: 2 };
  await fileAssessment({
    ...base,
    version: v2015,
    visitedOn: '2024-05-02T10:00:00Z',
    documents: sampleDocuments(prng, v2015.loaded.version, 0.9),
  });
  await fileAssessment({
    ...base,
    version: v2015,
    visitedOn: '2025-05-06T10:00:00Z',
    documents: sampleDocuments(prng, v2015.loaded.version, 0.95),
  });
  await fileAssessment({
    ...base,
    version: v2026,
    visitedOn: '2026-05-04T10:00:00Z',
    documents: sampleDocuments(prng, v2026.loaded.version, 0.93),
  });
  // A few gates last signed under 2015.1, so the impact list has something to show.
  const rank = { clear: 0, remedy: 1, withdraw: 2 } as const;
  const verdict = (
    v: typeof v2015,
    g: ReturnType<typeof sampleGate>,
    d: ReturnType<typeof sampleDocuments>,
  ) => {
    const built = buildEngineInput({ ...g, usageClass: 1 } as never, d as never);
    return built.ok ? scoreParsed(built.value, v.loaded).verdict : null;
  };
  for (let i = 0, found = 0; i < 3000 && found < 3; i++) {
    const g = sampleGate(prng);
    const d = sampleDocuments(prng, v2015.loaded.version);
    const before = verdict(v2015, g, d);
    const after = verdict(v2026, g, d);
    if (!before || !after || rank[after] <= rank[before]) continue;
    const id = await addGate(org.id, site, `Service gate ${++found}`, g);
    await fileAssessment({
      organisationId: org.id,
      auditorId: org.auditor.id,
      gateId: id,
      gate: g,
      usageClass: 1,
      version: v2015,
      visitedOn: `2025-0${found}-10T09:00:00Z`,
      documents: d,
    });
  }
  browser = await launchBrowser(inject('baseUrl'));
  const { page } = browser;
  await page.goto('/signin?next=/archive');
  await page.locator('#email').fill(org.owner.email);
  await page.locator('#password').fill(fixturePassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.getByRole('heading', { name: 'Archive' }).waitFor();
}, 120_000);

afterAll(async () => {
  await browser?.close();
});

describe('archive pages', () => {
  it("shows a gate's history with its trend and what is open from the last visit", async () => {
    const { page } = browser;
    await page.goto(`/archive/gates/${gateId}`);
    await page.getByRole('heading', { name: 'Courtyard swing gate' }).waitFor();
    expect(await page.getByRole('img', { name: /Verdicts over 3 visit/ }).count()).toBe(1);
    await page.getByRole('heading', { name: 'Open from the last visit' }).waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'archive-01-gate-history', { fullPage: true });
  });

  it('lists the impact of a newly published version', async () => {
    const { page } = browser;
    await page.goto(`/archive/impact?versionId=${impactVersionId}`);
    await page.getByRole('heading', { name: 'Ruleset impact' }).waitFor();
    await page.getByText(/re-scored in/).waitFor({ timeout: 30_000 });
    expect(await page.getByRole('link', { name: /Service gate/ }).count()).toBeGreaterThan(0);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'archive-02-impact', { fullPage: true });
  });

  it('verifies the audit trail from the owner page', async () => {
    const { page } = browser;
    await page.goto('/archive/audit');
    await page.getByRole('link', { name: 'Verify the chain' }).click();
    await page.getByText(/^\s*Intact:/).waitFor(); // the page's markup may wrap the text
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'archive-03-audit');
  });
});
