/**
 * In Debian's chromium: the office corrects a client's e-mail from the client page (the
 * homeowner account follows it), then sends an assessment for signature to an address it types,
 * and the signing link goes there. Screenshots into tests/e2e/screenshots/contacts-*.png.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createOrganisation, testDb, type FixtureOrganisation } from '../integration/support/fixtures';
import { seedScoredAssessment, type SeededAssessment } from '../integration/support/signing-seed';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';
import { signInThroughForm } from './support/sign-in';

let org: FixtureOrganisation;
let seeded: SeededAssessment;
let browser: BrowserSession;

beforeAll(async () => {
  org = await createOrganisation('client contacts');
  seeded = await seedScoredAssessment(
    testDb(),
    { id: org.id, auditorId: org.auditor.id, clientId: org.clientId },
    { dataDir: inject('dataDir'), photos: 0 },
  );
  browser = await launchBrowser(inject('baseUrl'));
  await signInThroughForm(browser.page, org.office.email, `/clients/${org.clientId}`);
});

afterAll(async () => {
  await browser?.close();
});

describe('client contacts in the browser', () => {
  it("corrects the client's e-mail from the client page, and the homeowner account follows", async () => {
    const { page } = browser;
    const corrected = `fixed.${org.homeowner.email}`;
    await page.goto(`/clients/${org.clientId}`);
    await page.getByText('Correct the client’s details').click();
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    const email = page.getByLabel('E-mail for reports and signing');
    expect(await email.inputValue()).toBe(org.homeowner.email);
    await email.fill('not an address');
    await page.getByRole('button', { name: 'Save the changes' }).click();
    await page.getByText('must be an e-mail address').waitFor();
    await email.fill(corrected);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'contacts-01-correct-client', { fullPage: true });
    await page.getByRole('button', { name: 'Save the changes' }).click();
    await page.getByText(corrected).first().waitFor();
    expect((await testDb()('clients').where({ id: org.clientId }).first('contact_email')).contact_email).toBe(
      corrected,
    );
    expect((await testDb()('users').where({ id: org.homeowner.id }).first('email')).email).toBe(corrected);
  });

  it('sends the signing link to an address the office types', async () => {
    const { page } = browser;
    const chosen = `manager.${org.slug}@fixtures.test`;
    await page.goto(`/assessments/${seeded.assessmentId}`);
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    await page.getByLabel('Send the link to').selectOption({ label: 'Another address…' });
    await page.getByLabel('E-mail address').fill(chosen);
    await page.getByText(`The link goes only to ${chosen}.`).waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'contacts-02-choose-recipient');
    await page.getByRole('button', { name: 'Send for signature' }).click();
    await page.getByText(`Waiting for ${chosen} to sign`).waitFor({ timeout: 20_000 });
    const requests = await testDb()('sign_requests')
      .where({ assessment_id: seeded.assessmentId })
      .select('recipient_email');
    expect(requests).toEqual([{ recipient_email: chosen }]);
  });

  it("corrects a site's address from the site page", async () => {
    const { page } = browser;
    await page.goto(`/sites/${seeded.siteId}`);
    await page.getByText('Correct the site’s address').click();
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    await page.getByLabel('Street address').fill('14 Corrected Lane');
    await page.getByLabel('Town or city').fill('');
    await page.getByRole('button', { name: 'Save the changes' }).click();
    await page
      .getByText('Town or city')
      .locator('..')
      .getByText(/must|required|at least/i)
      .first()
      .waitFor();
    await page.getByLabel('Town or city').fill('Eastholm');
    await page.getByRole('button', { name: 'Save the changes' }).click();
    await page.getByRole('heading', { name: /14 Corrected Lane/ }).waitFor();
    expect(await testDb()('sites').where({ id: seeded.siteId }).first('address_line1', 'city')).toEqual({
      address_line1: '14 Corrected Lane',
      city: 'Eastholm',
    });
  });
});
