/**
 * Server-rendered forms after a refused post, in Debian's chromium: the refusal from the
 * server's modules (a domain error) comes back as a summary at the top linking to the field and
 * the field's own message beside it (aria-invalid, aria-describedby), with what was typed kept
 * (passwords excepted). Screenshots at 360 and 1280 px into tests/e2e/screenshots/form-errors-*.png.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Locator, Page } from 'playwright-core';
import { createOrganisation, testDb, type FixtureOrganisation } from '../integration/support/fixtures';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';
import { signInThroughForm } from './support/sign-in';

let org: FixtureOrganisation;
let browser: BrowserSession;

beforeAll(async () => {
  org = await createOrganisation('form errors');
  browser = await launchBrowser(inject('baseUrl'));
});

afterAll(async () => {
  await browser?.close();
});

/**
 * The message the field names in aria-describedby (by `<field id>-error`), checked to sit
 * beside the field: in the same block, starting within 40 px below the field's bottom edge.
 */
async function messageBeside(page: Page, field: Locator): Promise<string> {
  expect(await field.getAttribute('aria-invalid')).toBe('true');
  const id = await field.getAttribute('id');
  const describedBy = (await field.getAttribute('aria-describedby'))?.split(' ') ?? [];
  expect(describedBy).toContain(`${id}-error`);
  const message = page.locator(`[id="${id}-error"]`);
  const [fieldBox, messageBox] = await Promise.all([field.boundingBox(), message.boundingBox()]);
  expect(fieldBox && messageBox).toBeTruthy();
  const gap = messageBox!.y - (fieldBox!.y + fieldBox!.height);
  expect(gap).toBeGreaterThanOrEqual(0);
  expect(gap).toBeLessThanOrEqual(40);
  return (await message.textContent())?.trim() ?? '';
}

/** The summary at the top: its heading and the fields its lines link to. */
async function summaryOf(page: Page, selector: string) {
  const summary = page.locator(selector);
  expect(await summary.getAttribute('role')).toBe('alert');
  const links = await summary.locator('a').evaluateAll((as) => as.map((a) => a.getAttribute('href')));
  return { text: ((await summary.textContent()) ?? '').replace(/\s+/g, ' ').trim(), links };
}

describe('refused forms show each message beside its field', () => {
  it('staff: inviting an address that already has an account names the e-mail field and keeps what was typed', async () => {
    const { page } = browser;
    await signInThroughForm(page, org.owner.email, '/staff');
    await page.goto('/staff');
    await page.getByLabel('E-mail', { exact: true }).fill(org.office.email);
    await page.getByLabel('Role', { exact: true }).selectOption('office');
    await page.getByRole('button', { name: 'Send invitation' }).click();
    await page.locator('#invite-email-error').waitFor();

    const email = page.getByLabel('E-mail', { exact: true });
    expect(await messageBeside(page, email)).toBe('E-mail already has an account.');
    expect(await email.inputValue()).toBe(org.office.email);
    expect(await page.getByLabel('Role', { exact: true }).inputValue()).toBe('office');
    const summary = await summaryOf(page, '#staff-errors');
    expect(summary.text).toMatch(/^The invitation was not sent\.\s*E-mail already has an account\.$/);
    expect(summary.links).toEqual(['#invite-email']);
    // Nothing was stored.
    const invitations = await testDb()('invitations').where({ organisation_id: org.id }).count({ n: '*' });
    expect(Number(invitations[0]!.n)).toBe(0);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'form-errors-01-staff-invite', { focus: '#staff-errors' });
  });

  it('settings: a time zone that does not exist is named beside its field; the other typed values stay', async () => {
    const { page } = browser;
    await page.goto('/settings');
    await page.getByLabel('Organisation name').fill('Renamed but not saved');
    await page.getByLabel('Time zone').fill('Nowhere/Special');
    await page.getByRole('button', { name: 'Save settings' }).click();
    await page.locator('#timeZone-error').waitFor();

    expect(await messageBeside(page, page.getByLabel('Time zone'))).toMatch(
      /^Time zone must be a time zone name/,
    );
    expect(await page.getByLabel('Time zone').inputValue()).toBe('Nowhere/Special');
    expect(await page.getByLabel('Organisation name').inputValue()).toBe('Renamed but not saved');
    expect((await summaryOf(page, '#settings-errors')).links).toEqual(['#timeZone']);
    const stored = await testDb()('organisations').where({ id: org.id }).first('name');
    expect(stored.name).toBe(org.name);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'form-errors-02-settings', { focus: '#settings-errors' });
  });

  it('account: a wrong current password is named beside that field', async () => {
    const { page } = browser;
    await page.goto('/account');
    await page.getByLabel('Current password').fill('not-the-password-at-all');
    await page.getByLabel('New password').fill('a-new-password-long-enough');
    await page.getByRole('button', { name: 'Change password' }).click();
    await page.locator('#currentPassword-error').waitFor();

    expect(await messageBeside(page, page.getByLabel('Current password'))).toBe(
      'Current password is not right.',
    );
    const summary = await summaryOf(page, '#form-errors');
    expect(summary.text).toMatch(/^The password was not changed\.\s*Current password is not right\.$/);
    expect(summary.links).toEqual(['#currentPassword']);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'form-errors-03-account', { focus: 'form' });
  });

  it('rulesets: an amendment refused is named beside the Amend button pressed', async () => {
    const { page } = browser;
    await page.goto('/rulesets');
    const form = page.locator('form:has(input[name="fromVersion"])').first();
    const family = await form.locator('input[name="fromFamily"]').inputValue();
    const version = await form.locator('input[name="fromVersion"]').inputValue();
    // A post naming the shipped family itself as the local family's name (a crafted form).
    await form.evaluate((el, name) => {
      const input = document.createElement('input');
      input.type = 'hidden';
      input.name = 'family';
      input.value = name;
      el.appendChild(input);
    }, family);
    await form.getByRole('button', { name: 'Amend' }).click();
    const key = `amend-${family}-${version}`;
    await page.locator(`[id="${key}-error"]`).waitFor();
    const button = page.locator(`[id="${key}"]`);
    expect(await button.getAttribute('aria-describedby')).toBe(`${key}-error`);
    expect(await page.locator(`[id="${key}-error"]`).textContent()).toMatch(/is a shipped family/);
    const summary = await summaryOf(page, '#amend-errors');
    expect(summary.text).toMatch(/No amendment was started\./);
    expect(summary.links).toEqual([`#${key}`]);
    const derived = await testDb()('rulesets').where({ organisation_id: org.id }).count({ n: '*' });
    expect(Number(derived[0]!.n)).toBe(0);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'form-errors-04-rulesets', { focus: '#amend-errors' });
  });

  it('verify: a document id of the wrong shape is named beside the id field and kept', async () => {
    const { page } = browser;
    await page.context().clearCookies();
    await page.goto('/verify');
    await page.getByLabel('Document id').fill('not-a-document-id');
    await page.getByRole('button', { name: 'Check' }).click();
    await page.locator('#document-id-error').waitFor();
    expect(await messageBeside(page, page.getByLabel('Document id'))).toMatch(
      /^The document id looks like 8-4-4-4-12 hexadecimal digits/,
    );
    expect(await page.getByLabel('Document id').inputValue()).toBe('not-a-document-id');
    expect((await summaryOf(page, '#verify-errors')).links).toEqual(['#document-id']);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'form-errors-05-verify', { focus: 'form' });
  });
});
