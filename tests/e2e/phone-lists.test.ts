/**
 * Lists on a 360 px phone, in Debian's chromium: the archive and the audit trail show results
 * as cards with status and verdict in view (no sideways scrolling), the archive's filters are
 * folded behind "More filters" so results come first, and every tap target (breadcrumbs,
 * download links, buttons, menus) is at least 44 px tall. Screenshots into
 * tests/e2e/screenshots/phone-*.png.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { createPrng, sampleDocuments, sampleGate } from '../support/archive-samples';
import {
  addClient,
  addGate,
  addSite,
  fileAssessment,
  publishedVersion,
} from '../integration/support/archive';
import { createOrganisation, type FixtureOrganisation } from '../integration/support/fixtures';
import { launchBrowser, phoneViewport, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';
import { signInThroughForm } from './support/sign-in';

let org: FixtureOrganisation;
let browser: BrowserSession;
let siteId: string;
let gateId: string;
let assessmentId: string;

/** Visible tap targets shorter than 44 px: buttons, menus, fields, navigation and download links. */
async function smallTargets(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const selector =
      'main button, main summary, main select, main a[download], main nav a, main .crumbs a, header a, header button, header summary';
    return [...document.querySelectorAll<HTMLElement>(selector)]
      .filter((el) => el.offsetParent !== null)
      .filter((el) => el.getBoundingClientRect().height < 44)
      .map(
        (el) =>
          `${el.tagName.toLowerCase()} "${(el.textContent ?? '').trim().slice(0, 40)}" ${Math.round(el.getBoundingClientRect().height)}px`,
      );
  });
}

async function noSidewaysScroll(page: Page): Promise<void> {
  expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(
    phoneViewport.width,
  );
}

beforeAll(async () => {
  org = await createOrganisation('phone lists');
  const version = await publishedVersion('north-american-gate', '2026.1');
  const prng = createPrng(3131);
  const gate = { ...sampleGate(prng), kind: 'slide' as const };
  const client = await addClient(org.id, 'Cinderford Builders Yard');
  siteId = await addSite(org.id, client, '14 Cinderford Road', 'Eastholm', 3);
  gateId = await addGate(org.id, siteId, 'Yard slide gate', gate);
  for (let i = 0; i < 4; i++) {
    const filed = await fileAssessment({
      organisationId: org.id,
      auditorId: org.auditor.id,
      gateId,
      gate,
      usageClass: 3,
      version,
      visitedOn: new Date(Date.now() - (400 - i * 90) * 86_400_000).toISOString(),
      documents: sampleDocuments(prng, version.loaded.version, 0.9),
    });
    assessmentId = filed.id;
  }
  browser = await launchBrowser(inject('baseUrl'));
  await signInThroughForm(browser.page, org.owner.email, '/archive');
});

afterAll(async () => {
  await browser?.close();
});

describe('lists and tap targets on a phone', () => {
  it('shows archive results as cards before the folded filters', async () => {
    const { page } = browser;
    await page.goto('/archive');
    // A result card (not the "Loading…" line that comes first).
    const card = page.getByRole('list', { name: 'Archived assessments' }).locator('li:has(a)').first();
    await card.waitFor();
    // The first result's top line (visit date, status and verdict) is on the first screen.
    const box = (await card.boundingBox())!;
    expect(box.y + 60).toBeLessThan(phoneViewport.height);
    expect(await card.innerText()).toMatch(/Signed/);
    expect(await card.innerText()).toMatch(/Out of automatic use|Fix by a date|No hazard above minor/);
    expect(await page.getByLabel('Gate kind').isVisible()).toBe(false);
    await noSidewaysScroll(page);
    expect(await smallTargets(page)).toEqual([]);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'phone-01-archive');
    await page.getByText('More filters').click();
    await page.getByLabel('Gate kind').selectOption('slide');
    await page.getByText(/4 assessments match/).waitFor();
    await page.getByText('More filters (1 in use)').waitFor();
  });

  it('shows the audit trail as cards', async () => {
    const { page } = browser;
    await page.goto('/archive/audit');
    await page
      .getByRole('list', { name: 'Audit events, newest first' })
      .getByRole('listitem')
      .first()
      .waitFor();
    await noSidewaysScroll(page);
    expect(await smallTargets(page)).toEqual([]);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'phone-02-audit');
  });

  it('keeps breadcrumbs, download links and buttons at least 44 px tall', async () => {
    const { page } = browser;
    for (const path of [
      `/sites/${siteId}`,
      `/assessments/${assessmentId}`,
      `/archive/gates/${gateId}`,
      '/archive/reinspection?within=365',
      '/assessments',
    ]) {
      await page.goto(path);
      await page.waitForLoadState('networkidle');
      expect(await smallTargets(page), path).toEqual([]);
      await noSidewaysScroll(page);
    }
  });
});
