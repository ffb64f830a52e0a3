/**
 * Re-inspection in Debian's chromium: on a site, a gate with a signed visit offers to start from
 * that visit's answers; the walk-through lists each carried answer marked "Confirm" until it is
 * confirmed; a gate is duplicated to a new gate on the same site. Screenshots at 360 and 1280 px
 * (reinspection-*.png); axe finds nothing.
 */
import fs from 'node:fs';
import { afterAll, beforeAll, beforeEach, describe, expect, inject, it } from 'vitest';
import { currentVersion, insertDraft, seedDirectory, type Directory } from '../integration/support/domain';
import { createOrganisation, testDb, type FixtureOrganisation } from '../integration/support/fixtures';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';
import { signInThroughForm } from './support/sign-in';

let org: FixtureOrganisation;
let dir: Directory;
let browser: BrowserSession;

beforeAll(async () => {
  org = await createOrganisation('reinspection e2e');
  dir = await seedDirectory(org);
  const version = await currentVersion('north-american-gate');
  await insertDraft(org.id, dir.gateId, org.auditor.id, version.id, {
    status: 'signed',
    verdict: 'remedy',
    visited_on: new Date('2026-03-02T15:00:00Z'),
    answers: JSON.stringify({ placardsLegible: { value: 'yes' }, hingeSideGuarded: { value: 'no' } }),
    measurements: JSON.stringify({ hingeGapMm: { value: 1, unit: 'in', canonical: 25.4 } }),
    result: JSON.stringify({ verdict: 'remedy' }),
    result_sha256: 'a'.repeat(64),
    submitted_at: new Date('2026-03-02T17:00:00Z'),
    signed_at: new Date('2026-03-03T09:00:00Z'),
  });
  browser = await launchBrowser(inject('baseUrl'));
  await signInThroughForm(browser.page, org.auditor.email, `/sites/${dir.siteId}`);
});

/** The gate card's islands are live (islands in closed panels elsewhere stay server-rendered). */
async function gateCardReady(gateId: string) {
  await browser.page.waitForFunction(
    (sel) => !document.querySelector(`${sel} astro-island[ssr]`),
    `#gate-${gateId}`,
  );
}

afterAll(async () => {
  await browser?.close();
});

beforeEach(({ task, onTestFailed }) => {
  onTestFailed(async () => {
    fs.mkdirSync('test-results', { recursive: true });
    await browser?.page
      .screenshot({
        path: `test-results/${task.name.replace(/[^a-z0-9]+/gi, '-').slice(0, 60)}.png`,
        fullPage: true,
      })
      .catch(() => {});
  });
});

describe('a re-inspection from the last signed visit', () => {
  let draftId = '';

  it('offers to start from the signed visit and carries its answers into the walk-through, each to confirm', async () => {
    const { page } = browser;
    await page.goto(`/sites/${dir.siteId}`);
    await gateCardReady(dir.gateId);
    const card = page.locator(`#gate-${dir.gateId}`);
    const carry = card.getByRole('checkbox', {
      name: /Start from the answers of the signed visit on Mar 2, 2026/,
    });
    await carry.check();
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'reinspection-01-start-from-last-visit', {
      focus: `#gate-${dir.gateId}`,
    });
    await card.getByRole('button', { name: 'Start the walk-through' }).click();
    await page.waitForURL(/\/assessments\/[0-9a-f-]+\/walk$/);
    draftId = /assessments\/([0-9a-f-]+)\/walk/.exec(page.url())?.[1] ?? '';

    const panel = page.locator('[data-carried-forward]');
    await panel.getByRole('heading', { name: 'Carried forward: 3 to confirm' }).waitFor();
    await expect(panel.locator('[data-carried-item="measurements.hingeGapMm"]').innerText()).resolves.toMatch(
      /Confirm[\s\S]*Last visit: 1 in/,
    );
    expect(await seriousAxeViolations(page, ['[data-carried-forward]'])).toEqual([]);
    await screenshotBothWidths(page, 'reinspection-02-carried-to-confirm', {
      focus: '[data-carried-forward]',
    });
  });

  it('confirms one answer, then the rest, and the panel says so', async () => {
    const { page } = browser;
    const panel = page.locator('[data-carried-forward]');
    await panel.getByRole('button', { name: /^Confirm: Is the hinge-side gap covered/ }).click();
    await panel.getByRole('heading', { name: 'Carried forward: 2 to confirm' }).waitFor();
    expect(
      (await testDb()('assessments').where({ id: draftId }).first('carried_forward')).carried_forward.pending,
    ).toEqual(['answers.placardsLegible', 'measurements.hingeGapMm']);
    await panel.getByRole('button', { name: 'Confirm all 2 as they are' }).click();
    await page.locator('[data-carried-forward="done"]').waitFor();
    expect(
      (await testDb()('assessments').where({ id: draftId }).first('carried_forward')).carried_forward.pending,
    ).toEqual([]);
  });
});

describe('duplicating a gate', () => {
  it('copies the gate to a new one on the same site and opens it to name it', async () => {
    const { page } = browser;
    await page.goto(`/sites/${dir.siteId}`);
    await gateCardReady(dir.gateId);
    const label = (await testDb()('gates').where({ id: dir.gateId }).first('label')).label as string;
    await page
      .locator(`#gate-${dir.gateId}`)
      .getByRole('button', { name: `Duplicate ${label}` })
      .click();
    await page.waitForURL(/\/gates\/[0-9a-f-]+\?next=/);
    const copy = await testDb()('gates')
      .where({ organisation_id: org.id, site_id: dir.siteId, label: `${label} (copy)` })
      .first('id', 'kind');
    expect(copy).toBeTruthy();
    expect(page.url()).toContain(`/gates/${copy.id}`);
    // The form's island may still be starting when the page arrives.
    await expect
      .poll(() => page.getByLabel('Name of the gate').inputValue(), { timeout: 10_000 })
      .toBe(`${label} (copy)`);
    await page.goto(`/sites/${dir.siteId}`);
    await page.locator(`#gate-${copy.id}`).waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'reinspection-03-duplicated-gate', { focus: `#gate-${copy.id}` });
  });
});
