/**
 * An owner amends a ruleset on a phone, in Debian's chromium: reads the shipped version, starts
 * an amendment, lowers a threshold, sees the diff against the shipped version, adds a local
 * requirement with its own reference (after the form refuses it half-filled), and publishes.
 * Every page is checked with axe-core and photographed at 360 px and 1280 px.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import {
  createOrganisation,
  fixturePassword,
  type FixtureOrganisation,
} from '../integration/support/fixtures';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';

let org: FixtureOrganisation;
let session: BrowserSession;
let page: Page;

async function checkPage(name: string, options: { fullPage?: boolean } = {}) {
  expect(await seriousAxeViolations(page), `axe on ${name}`).toEqual([]);
  // Nothing may push the page sideways at phone width.
  expect(
    await page.evaluate(() => document.documentElement.scrollWidth),
    `${name} fits 360 px`,
  ).toBeLessThanOrEqual(360);
  await screenshotBothWidths(page, name, options);
}

beforeAll(async () => {
  org = await createOrganisation('rulesets e2e');
  session = await launchBrowser(inject('baseUrl'));
  page = session.page;
});

afterAll(async () => {
  await session?.close();
});

describe('an owner amends the North American ruleset on a phone', () => {
  it('signs in and sees the rulesets', async () => {
    await page.goto('/signin?next=/rulesets');
    await page.locator('#email').fill(org.owner.email);
    await page.locator('#password').fill(fixturePassword);
    await page.getByRole('button', { name: 'Sign in', exact: true }).click();
    await page.waitForURL(/\/rulesets$/);
    await expect(page.getByRole('heading', { name: 'Rulesets', level: 1 }).isVisible()).resolves.toBe(true);
    await checkPage('rulesets-01-list');
  });

  it('reads the shipped version in plain words', async () => {
    await page.goto('/rulesets/north-american-gate/2026.1');
    await expect(page.locator('#rule-pinch\\.fixed-objects').innerText()).resolves.toContain(
      'fixed object clearance is at least 406.4 mm',
    );
    await checkPage('rulesets-02-version');
  });

  it('starts an amendment and lands in the editor', async () => {
    await page.getByRole('button', { name: 'Amend this version' }).click();
    await page.waitForURL(/\/rulesets\/north-american-gate-local\/2026\.1-local\.1\/edit$/);
    await page.getByRole('button', { name: 'Add a local requirement' }).waitFor();
    await checkPage('rulesets-03-editor');
  });

  it('lowers a threshold, saves it and sees the change in the diff', async () => {
    await page.getByLabel('Find a rule').fill('fixed object');
    const card = page.locator('[id="rule-pinch.fixed-objects"]');
    const input = card.getByLabel('min clearance');
    await input.fill('300');
    await expect(card.innerText()).resolves.toContain('was 406.4 mm');
    await page.getByRole('button', { name: 'Save 1' }).click();
    await page.getByText('Changes saved to the draft.').waitFor();
    const diff = page.locator('section[aria-labelledby="diff-heading"]');
    await diff.getByText('300 mm').waitFor();
    await expect(diff.innerText()).resolves.toMatch(/min clearance[\s\S]*406\.4 mm[\s\S]*300 mm/);
    await expect(diff.innerText()).resolves.not.toMatch(/params\.|north-american-gate/);
    await checkPage('rulesets-04-threshold-saved');
  });

  it('refuses a half-filled local requirement beside its fields, then adds it', async () => {
    await page.getByRole('button', { name: 'Add a local requirement' }).click();
    await page.getByLabel('Title').fill('Fire service key switch at the gate');
    await page.getByRole('button', { name: 'Add to the draft' }).click();
    await page.getByText('must not be empty').first().waitFor();
    await checkPage('rulesets-05-local-form-errors');
    await page
      .getByLabel('The question the auditor is asked')
      .fill('Is a fire service key switch fitted at the gate, and does it open the gate?');
    await page
      .getByLabel('Why it matters (shown beside the question)')
      .fill('Fire crews must get through a closed gate without waiting for anyone.');
    await page
      .getByLabel('Remedy')
      .fill('Fit the key switch the fire service specifies beside the entry lane.');
    await page
      .getByLabel('Caution shown to the homeowner')
      .fill('Do not remove or disable the fire service key switch.');
    await page.getByLabel('Local code or authority').fill('Eastholm County fire code');
    await page.getByLabel('Section or clause').fill('§ 5.12 Emergency access');
    await page.getByRole('button', { name: 'Add to the draft' }).click();
    await page.getByText('“Fire service key switch at the gate” added to the draft.').waitFor();
    await expect(page.locator('section[aria-labelledby="local-heading"]').innerText()).resolves.toContain(
      'Fire service key switch at the gate',
    );
  });

  it('publishes, and the version reads as published with the amendments in it', async () => {
    await page.getByRole('button', { name: 'Publish…' }).click();
    await page.getByRole('button', { name: 'Publish now' }).click();
    await page.waitForURL(/\/rulesets\/north-american-gate-local\/2026\.1-local\.1$/);
    const text = await page.locator('main').innerText();
    expect(text).toContain('Published');
    expect(text).toContain('fixed object clearance is at least 300 mm');
    expect(text).toContain('Eastholm County fire code');
    await checkPage('rulesets-06-published');
  });
});
