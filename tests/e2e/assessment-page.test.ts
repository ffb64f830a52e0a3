/**
 * One assessment's page, in Debian's chromium: the office reads the verdict with its meaning,
 * the findings with hazard, fix and source, downloads the report and sends it for signature
 * (the e-mail shows "Sending…" and then "Sent" without a reload); the homeowner reads their own
 * report's page; another organisation's id and an unknown address get the app's own 404 page
 * with a way back. Screenshots at 360 and 1280 px into tests/e2e/screenshots/assessment-*.png.
 */
import fs from 'node:fs';
import { afterAll, beforeAll, beforeEach, describe, expect, inject, it } from 'vitest';
import {
  createOrganisation,
  signInHomeowner,
  testDb,
  type FixtureOrganisation,
} from '../integration/support/fixtures';
import { seedScoredAssessment, type SeededAssessment } from '../integration/support/signing-seed';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';
import { signInThroughForm, useSessionOf } from './support/sign-in';

let org: FixtureOrganisation;
let other: FixtureOrganisation;
let seeded: SeededAssessment;
let othersAssessment: SeededAssessment;
let browser: BrowserSession;

beforeAll(async () => {
  [org, other] = await Promise.all([
    createOrganisation('assessment page'),
    createOrganisation('assessment page other'),
  ]);
  seeded = await seedScoredAssessment(
    testDb(),
    { id: org.id, auditorId: org.auditor.id, clientId: org.clientId },
    { dataDir: inject('dataDir'), photos: 1 },
  );
  othersAssessment = await seedScoredAssessment(
    testDb(),
    { id: other.id, auditorId: other.auditor.id, clientId: other.clientId },
    { dataDir: inject('dataDir'), photos: 0 },
  );
  browser = await launchBrowser(inject('baseUrl'));
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

describe("an assessment's page", () => {
  it('shows the office the verdict with its meaning and each finding with hazard, fix and source', async () => {
    const { page } = browser;
    await signInThroughForm(page, org.office.email, `/assessments/${seeded.assessmentId}`);
    await page.getByRole('heading', { name: 'Driveway gate', level: 1 }).waitFor();
    await page.getByRole('heading', { name: 'Take out of automatic use' }).waitFor();
    await page.getByText(/Switch the operator off or to manual release/).waitFor();
    const failing = seeded.result.findings.filter((f) => f.outcome === 'fail');
    await page.getByRole('heading', { name: `What needs fixing (${failing.length})` }).waitFor();
    const first = page.locator('[data-finding]').first();
    expect(await first.textContent()).toMatch(/Critical/);
    expect(await first.textContent()).toMatch(/Fix\s*Fit a guard/);
    expect(await first.textContent()).toMatch(/Source\s*UL 325-2016, 32\.1\./);
    // The hazard area by its title in the ruleset, never the code.
    expect(await first.textContent()).toMatch(
      /Pinch and crush points|Gaps and openings|Signs|Force and reversal|Entrapment sensing|Controls/,
    );
    const pdf = await page.request.get(
      await page
        .getByRole('link', { name: 'Download the report (PDF)' })
        .getAttribute('href')
        .then((h) => h!),
    );
    expect(pdf.headers()['content-type']).toBe('application/pdf');
    // No machine words on the page.
    expect(await page.locator('main').innerText()).not.toMatch(/\b[a-z]+_[a-z_]+\b|\bcheck-\d+\b/);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'assessment-01-office-view', { fullPage: true });
  });

  it('sends for signature and shows the e-mail as sending, then sent, without a reload', async () => {
    const { page } = browser;
    await page.getByRole('button', { name: 'Send for signature' }).click();
    await page.waitForLoadState('load');
    const mail = page.locator('[data-message-status]').first();
    await mail.waitFor();
    // Delivered to the catcher within moments: the page catches up by itself.
    await page.locator('[data-message-status="sent"]').first().waitFor({ timeout: 10_000 });
    expect(await mail.textContent()).toMatch(/Sent /);
    expect(await page.getByText('waiting for the mail server').count()).toBe(0);
    await page.getByRole('heading', { name: 'History' }).waitFor();
    await page.getByText('Sent for signature', { exact: true }).waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'assessment-02-sent', { fullPage: true });
  });

  it("shows the homeowner their own report's page, in words for the owner, without the office's details", async () => {
    const { page } = browser;
    const homeowner = await signInHomeowner(org.homeowner.email);
    await useSessionOf(page.context(), homeowner, inject('baseUrl'));
    const response = await page.goto(`/assessments/${seeded.assessmentId}`);
    expect(response?.status()).toBe(200);
    await page.getByRole('heading', { name: 'Take out of automatic use' }).waitFor();
    await page.getByText(/Stop automatic operation now/).waitFor();
    await page.getByText(/Waiting for your signature/).waitFor();
    expect(await page.getByRole('heading', { name: 'E-mails' }).count()).toBe(0);
    expect(await page.getByText(org.office.email).count()).toBe(0);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'assessment-03-homeowner-view', { fullPage: true });

    // Another organisation's assessment is a 404, with a way back.
    const foreign = await page.goto(`/assessments/${othersAssessment.assessmentId}`);
    expect(foreign?.status()).toBe(404);
    await page.getByRole('heading', { name: 'This assessment was not found' }).waitFor();
    await page.getByRole('link', { name: 'Back to assessments' }).waitFor();
  });

  it("is a 404 for a homeowner while their client's report has not been sent", async () => {
    const { page } = browser;
    const notSent = await seedScoredAssessment(
      testDb(),
      { id: org.id, auditorId: org.auditor.id, clientId: org.clientId },
      { dataDir: inject('dataDir'), photos: 0 },
    );
    const response = await page.goto(`/assessments/${notSent.assessmentId}`);
    expect(response?.status()).toBe(404);
  });

  it('opens from the archive: the visit date links to the page', async () => {
    const { page } = browser;
    await signInThroughForm(page, org.owner.email, '/archive');
    // Two assessments of the same day: the one sent for signature.
    await page.locator(`a[href="/assessments/${seeded.assessmentId}"]`).first().click();
    await page.waitForURL(new RegExp(`/assessments/${seeded.assessmentId}$`));
    await page.getByRole('heading', { name: 'Driveway gate', level: 1 }).waitFor();
    const old = await page.goto(`/assessments/${seeded.assessmentId}/report`);
    expect(old?.status()).toBe(200);
    await page.getByRole('heading', { name: 'Take out of automatic use' }).waitFor();
  });

  it("answers an unknown address with the app's own 404 page, and has its own error page", async () => {
    const { page } = browser;
    const response = await page.goto('/no-such-page');
    expect(response?.status()).toBe(404);
    await page.getByRole('heading', { name: 'This page was not found' }).waitFor();
    await page.getByRole('link', { name: 'Go to your home page' }).waitFor();
    await page.getByRole('navigation', { name: 'Main' }).waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'assessment-04-not-found');
    await page.goto('/500');
    await page.getByRole('heading', { name: 'Something went wrong on our side' }).waitFor();
    await page.getByRole('link', { name: 'Try again' }).waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'assessment-05-error');
  });
});
