/**
 * The audit trail's search and filters in Debian's chromium, as the owner on a phone: the
 * filters start collapsed and the events show as cards; a search narrows them; a bad filter
 * is named in an alert with nothing listed. Screenshots at 360 and 1280 px (audit-*.png).
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { recordAudit } from '../../src/lib/server/audit';
import { createOrganisation, testDb, type FixtureOrganisation } from '../integration/support/fixtures';
import { launchBrowser, phoneViewport, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';
import { signInThroughForm } from './support/sign-in';

let org: FixtureOrganisation;
let browser: BrowserSession;

beforeAll(async () => {
  org = await createOrganisation('audit search e2e');
  await testDb().transaction(async (trx) => {
    for (const [action, email] of [
      ['user.invited', 'first-hire@staff.test'],
      ['user.invited', 'second-hire@staff.test'],
      ['gate.updated', null],
    ] as const)
      await recordAudit(trx, {
        organisationId: org.id,
        actorUserId: org.owner.id,
        actorLabel: org.owner.email,
        action,
        entityType: action === 'gate.updated' ? 'gate' : 'user',
        detail: email ? { email } : {},
      });
  });
  browser = await launchBrowser(inject('baseUrl'));
  await signInThroughForm(browser.page, org.owner.email, '/archive/audit');
});

afterAll(async () => {
  await browser?.close();
});

describe('searching the audit trail', () => {
  it('starts with the filters collapsed and the events as cards on a phone', async () => {
    const { page } = browser;
    await page.setViewportSize(phoneViewport);
    await page.goto('/archive/audit');
    const filters = page.locator('[data-audit-filters]');
    expect(await filters.evaluate((el) => (el as HTMLDetailsElement).open)).toBe(false);
    await page.getByRole('list', { name: 'Audit events, newest first' }).waitFor();
    // The three events above and the owner's own sign-in.
    expect(
      await page.getByRole('list', { name: 'Audit events, newest first' }).locator('li').count(),
    ).toBeGreaterThanOrEqual(4);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'audit-01-collapsed', { fullPage: true });
  });

  it('narrows the events to a search and an event kind', async () => {
    const { page } = browser;
    await page.setViewportSize(phoneViewport);
    await page.goto('/archive/audit');
    await page.locator('[data-audit-filters] summary').click();
    await page.locator('[data-audit-filters] input[name=q]').fill('second-hire');
    await page.locator('[data-audit-filters] select[name=action]').selectOption('user.invited');
    await page.getByRole('button', { name: 'Show events' }).click();
    await page.waitForURL(/q=second-hire/);
    const cards = page.getByRole('list', { name: 'Audit events, newest first' }).locator('li');
    expect(await cards.count()).toBe(1);
    expect(await page.locator('[data-audit-filters]').evaluate((el) => (el as HTMLDetailsElement).open)).toBe(
      true,
    );
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'audit-02-filtered', { fullPage: true });
  });

  it('names a bad filter and lists nothing', async () => {
    const { page } = browser;
    const response = await page.goto(`/archive/audit?from=2026-12-10&to=2026-12-01`);
    expect(response?.status()).toBe(400);
    await expect(page.locator('[data-filter-errors]').innerText()).resolves.toMatch(/To: must not be before/);
    expect(await page.getByRole('list', { name: 'Audit events, newest first' }).locator('li').count()).toBe(
      0,
    );
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'audit-03-bad-filter');
  });
});
