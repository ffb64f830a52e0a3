/**
 * The verdict reads as a status and nothing irreversible happens on one tap, in Debian's
 * chromium: the live verdict in the walk-through's top strip is coloured text with its meaning
 * (not a red pill beside "All saved"); Submit asks first, in an accessible dialog that says what
 * happens; a draft started by mistake can be discarded from its page after a confirmation; the
 * Staff page cancels an invitation with "Cancel invitation". Screenshots into
 * tests/e2e/screenshots/verdict-*.png.
 */
import fs from 'node:fs';
import { afterAll, beforeAll, beforeEach, describe, expect, inject, it } from 'vitest';
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
let draftId: string;
let mistakeId: string;

beforeAll(async () => {
  org = await createOrganisation('walk verdict');
  const version = await publishedVersion('north-american-gate', '2026.1');
  const prng = createPrng(4242);
  const gate = { ...sampleGate(prng), kind: 'swing' as const, openingDirection: 'pull_to_open' as const };
  const client = await addClient(org.id, 'Tallowby Farm');
  const site = await addSite(org.id, client, '4 Tallowby Lane', 'Eastholm', 1);
  const gateId = await addGate(org.id, site, 'Farm gate', gate);
  const base = {
    organisationId: org.id,
    auditorId: org.auditor.id,
    gateId,
    gate,
    usageClass: 1,
    version,
    status: 'draft' as const,
  };
  // Answers with gaps, so the live result has something to say and something left to check.
  ({ id: draftId } = await fileAssessment({
    ...base,
    visitedOn: new Date().toISOString(),
    documents: sampleDocuments(prng, version.loaded.version, 0.8),
  }));
  ({ id: mistakeId } = await fileAssessment({
    ...base,
    visitedOn: new Date().toISOString(),
    documents: { answers: {}, measurements: {}, observations: {} } as never,
  }));
  browser = await launchBrowser(inject('baseUrl'));
  await signInThroughForm(browser.page, org.auditor.email, `/assessments/${draftId}/walk`);
});

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

describe('the verdict and irreversible steps', () => {
  it('shows the live verdict as a status with its meaning, not as a red pill', async () => {
    const { page } = browser;
    const live = page.locator('[data-live-verdict]');
    await live.waitFor({ timeout: 30_000 });
    const text = (await live.innerText()).replace(/\s+/g, ' ');
    expect(text).toMatch(/^. ?Verdict so far: (Out of automatic use|Fix by a date|No hazard above minor)/);
    expect(text).not.toMatch(/Withdraw/);
    // Coloured text on the strip's own background: nothing filled that looks like a button.
    expect(await live.evaluate((el) => getComputedStyle(el).backgroundColor)).toBe('rgba(0, 0, 0, 0)');
    expect((await live.boundingBox())!.height).toBeGreaterThanOrEqual(44);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'verdict-01-status-strip');
  });

  it('asks before submitting, says what happens, and submits only when confirmed', async () => {
    const { page } = browser;
    await page.getByRole('tab', { name: 'Result' }).click();
    await page.getByRole('button', { name: 'Submit the assessment' }).click();
    const dialog = page.getByRole('dialog', { name: 'Submit this assessment?' });
    await dialog.waitFor();
    expect(await dialog.innerText()).toMatch(/cannot be changed/);
    expect(await seriousAxeViolations(page, ['dialog'])).toEqual([]);
    await screenshotBothWidths(page, 'verdict-02-submit-confirm');
    // Escape backs out: still a draft.
    await page.keyboard.press('Escape');
    await dialog.waitFor({ state: 'hidden' });
    expect((await testDb()('assessments').where({ id: draftId }).first('status')).status).toBe('draft');
    await page.getByRole('button', { name: 'Submit the assessment' }).click();
    await page.getByRole('button', { name: 'Submit and score' }).click();
    await page.getByText('Submitted result').waitFor({ timeout: 30_000 });
    expect((await testDb()('assessments').where({ id: draftId }).first('status')).status).toBe('scored');
  });

  it('discards a draft started by mistake, after a confirmation', async () => {
    const { page } = browser;
    await page.goto(`/assessments/${mistakeId}`);
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    await page.getByRole('button', { name: 'Discard this draft' }).click();
    const dialog = page.getByRole('dialog', { name: 'Discard this draft?' });
    await dialog.waitFor();
    expect(await dialog.innerText()).toMatch(/cannot be undone/);
    expect(await seriousAxeViolations(page, ['dialog'])).toEqual([]);
    await screenshotBothWidths(page, 'verdict-03-discard-confirm');
    await page.getByRole('button', { name: 'Keep the draft' }).click();
    expect(await testDb()('assessments').where({ id: mistakeId }).first('id')).toBeTruthy();
    await page.getByRole('button', { name: 'Discard this draft' }).click();
    await page.getByRole('button', { name: 'Discard the draft' }).click();
    await page.waitForURL(/\/assessments\?discarded=1$/);
    expect(await testDb()('assessments').where({ id: mistakeId }).first('id')).toBeUndefined();
  });

  it('cancels an invitation with "Cancel invitation", not "Withdraw"', async () => {
    const { page } = browser;
    await signInThroughForm(page, org.owner.email, '/staff');
    await page.getByLabel('E-mail').fill('new.hand@fixtures.test');
    await page.getByRole('button', { name: 'Send invitation' }).click();
    await page.getByRole('button', { name: 'Cancel invitation to new.hand@fixtures.test' }).waitFor();
    expect(await page.getByRole('button', { name: 'Withdraw' }).count()).toBe(0);
    expect(await page.locator('main').innerText()).not.toMatch(/last signed in never/);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'verdict-04-staff-invitation', { fullPage: true });
    await page.getByRole('button', { name: 'Cancel invitation to new.hand@fixtures.test' }).click();
    await page.getByText('Invitation cancelled').waitFor();
  });
});
