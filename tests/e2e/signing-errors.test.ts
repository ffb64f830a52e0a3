/**
 * The signing form's error summary follows the form, in Debian's chromium at 360 px: pressing
 * Sign with nothing done lists every problem (each a link to its field); each one goes away as
 * soon as the homeowner fixes it, and the summary disappears when nothing is left.
 * Screenshots into tests/e2e/screenshots/signing-errors-*.png.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from '../integration/support/fixtures';
import { seedScoredAssessment } from '../integration/support/signing-seed';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';

let org: FixtureOrganisation;
let office: TestClient;
let browser: BrowserSession;
let linkPath: string;

beforeAll(async () => {
  org = await createOrganisation('signing errors');
  office = await signIn(org.office.email, fixturePassword);
  const seeded = await seedScoredAssessment(
    testDb(),
    { id: org.id, auditorId: org.auditor.id, clientId: org.clientId },
    { dataDir: inject('dataDir'), photos: 0 },
  );
  const since = Date.now() - 50;
  expect(
    (await office.json('POST', `/api/assessments/${seeded.assessmentId}/send-for-signature`, {})).status,
  ).toBe(202);
  const deadline = Date.now() + 15_000;
  for (;;) {
    const list = (await (await fetch(`${inject('catcherUrl')}/messages`)).json()) as Array<{
      id: string;
      to: string[];
      receivedAt: string;
    }>;
    const mail = list.find((m) => m.to.includes(org.homeowner.email) && Date.parse(m.receivedAt) >= since);
    if (mail) {
      const { text } = (await (await fetch(`${inject('catcherUrl')}/messages/${mail.id}`)).json()) as {
        text: string;
      };
      linkPath = new URL(/https?:\/\/\S+\/sign\/[A-Za-z0-9_-]{43}/.exec(text)![0]).pathname;
      break;
    }
    if (Date.now() > deadline) throw new Error('the signing e-mail did not arrive');
    await new Promise((r) => setTimeout(r, 150));
  }
  browser = await launchBrowser(inject('baseUrl'));
});

afterAll(async () => {
  await browser?.close();
});

describe("the signing form's error summary", () => {
  it('lists what is missing and clears each item as it is fixed', async () => {
    const { page } = browser;
    await page.goto(linkPath);
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    const summary = page.locator('#sign-errors');
    await page.getByRole('button', { name: 'Sign the report' }).click();
    await summary.waitFor();
    const items = () => summary.locator('li').allInnerTexts();
    expect(await items()).toHaveLength(4);
    expect(await summary.getByRole('link', { name: 'Type your full name.' }).getAttribute('href')).toBe(
      '#signer-name',
    );
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'signing-errors-01-summary', { focus: '#sign-errors' });

    await page.getByRole('checkbox', { name: /sign this acknowledgement electronically/ }).check();
    await expect.poll(items).not.toContain('Tick the box to agree to sign electronically.');
    expect(await items()).toHaveLength(3);
    await page.getByLabel('Your full name').fill('Ada Marrow');
    await expect.poll(items).not.toContain('Type your full name.');
    await page.getByRole('checkbox', { name: /cannot draw/ }).check();
    await expect.poll(items).toHaveLength(1);
    for (const box of await page.locator('#sign-cautions').getByRole('checkbox').all()) await box.check();
    await summary.waitFor({ state: 'detached' });
    await screenshotBothWidths(page, 'signing-errors-02-cleared', { focus: '#sign-cautions' });
  });
});
