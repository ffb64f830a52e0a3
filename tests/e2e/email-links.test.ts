/**
 * The two e-mailed links a person opens in their own browser, at 360 px, in Debian's chromium:
 * a homeowner asks for a sign-in link on the sign-in page, opens it from the caught mail and
 * lands signed in; an invited office person opens the invitation, chooses a name and password,
 * and signs in with them. Both pages keep their token from other sites (Referrer-Policy) and
 * their forms must still pass the server's same-site check.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import {
  caughtMailIds,
  createOrganisation,
  fixturePassword,
  linkIn,
  signIn,
  waitForMail,
  type FixtureOrganisation,
  type TestClient,
} from '../integration/support/fixtures';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';

let org: FixtureOrganisation;
let owner: TestClient;
let browser: BrowserSession;

beforeAll(async () => {
  org = await createOrganisation('email-links');
  owner = await signIn(org.owner.email, fixturePassword);
  browser = await launchBrowser(inject('baseUrl'));
});

afterAll(async () => {
  await browser?.close();
});

async function hasSessionCookie(): Promise<boolean> {
  return (await browser.context.cookies()).some((c) => /authjs\.session-token/.test(c.name));
}

describe('e-mailed links in a phone browser', () => {
  it('signs a homeowner in from the link in their e-mail', async () => {
    const { page, context } = browser;
    await context.clearCookies();
    await page.goto('/signin');
    const seen = await caughtMailIds(org.homeowner.email);
    await page.getByLabel('E-mail').nth(1).fill(org.homeowner.email);
    await page.getByRole('button', { name: 'E-mail me a sign-in link' }).click();
    await page.getByText('Check your inbox.').waitFor();
    const link = linkIn((await waitForMail(org.homeowner.email, seen)).text, '/signin/link');
    expect(new URL(link).origin).toBe(inject('baseUrl'));

    const landing = await page.goto(link);
    expect(landing?.headers()['referrer-policy']).toBe('same-origin');
    await page.getByRole('heading', { name: 'Finish signing in' }).waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(360);
    await screenshotBothWidths(page, 'links-01-sign-in-link');

    await page.getByRole('button', { name: 'Continue to my reports' }).click();
    await page.waitForURL((url) => url.pathname === '/');
    await page.getByRole('heading', { name: 'Your gate reports' }).waitFor();
    expect(await hasSessionCookie()).toBe(true);
    await page.getByText('Menu', { exact: true }).click();
    await page.getByRole('button', { name: 'Sign out' }).last().waitFor();
    await screenshotBothWidths(page, 'links-02-homeowner-signed-in');
    // The link worked once: opening it again and pressing the button says so.
    await context.clearCookies();
    await page.goto(link);
    await page.getByRole('button', { name: 'Continue to my reports' }).click();
    await page.getByText('That sign-in link has expired or was already used.').waitFor();
    expect(await hasSessionCookie()).toBe(false);
  });

  it('lets an invited office person accept the invitation and sign in', async () => {
    const { page, context } = browser;
    await context.clearCookies();
    const email = `invited-${Date.now()}@fixtures.test`;
    const seen = await caughtMailIds(email);
    expect((await owner.json('POST', '/api/invitations', { email, role: 'office' })).status).toBe(201);
    const link = linkIn((await waitForMail(email, seen)).text, '/invite/');
    expect(new URL(link).origin).toBe(inject('baseUrl'));

    const landing = await page.goto(link);
    expect(landing?.headers()['referrer-policy']).toBe('same-origin');
    await page.getByRole('heading', { name: `Join ${org.name}` }).waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(360);
    await page.getByLabel('Your name').fill('Wren Halloway');
    await page.getByLabel('Choose a password').fill('hedgerow-lantern-quay');
    await page.getByLabel('Type it again').fill('hedgerow-lantern-quay');
    await screenshotBothWidths(page, 'links-03-invitation', { fullPage: true });
    await page.getByRole('button', { name: 'Create my account' }).click();

    await page.waitForURL((url) => url.pathname === '/signin' && url.searchParams.has('invited'));
    await page.getByText('Your account is ready.').waitFor();
    await page.getByLabel('E-mail').first().fill(email);
    await page.getByLabel('Password').fill('hedgerow-lantern-quay');
    await page.getByRole('button', { name: 'Sign in', exact: true }).click();
    await page.waitForURL((url) => url.pathname === '/');
    expect(await hasSessionCookie()).toBe(true);
    await page.getByText('Menu', { exact: true }).click();
    await page.getByRole('link', { name: 'Archive' }).last().waitFor();
    await screenshotBothWidths(page, 'links-04-invited-signed-in');
  });

  it('lets a staff member who forgot their password choose a new one from the e-mailed link', async () => {
    const { page, context } = browser;
    await context.clearCookies();
    await page.goto('/signin');
    await page.getByRole('link', { name: 'Forgot your password?' }).click();
    await page.waitForURL((url) => url.pathname === '/signin/forgot');
    const seen = await caughtMailIds(org.auditor.email);
    await page.getByLabel('E-mail').fill(org.auditor.email);
    await page.getByRole('button', { name: 'E-mail me a reset link' }).click();
    await page.getByText('Check your inbox.').waitFor();
    const link = linkIn((await waitForMail(org.auditor.email, seen)).text, '/signin/reset');
    expect(new URL(link).origin).toBe(inject('baseUrl'));

    const landing = await page.goto(link);
    expect(landing?.headers()['referrer-policy']).toBe('same-origin');
    await page.getByRole('heading', { name: 'Choose a new password' }).waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(360);
    await page.getByLabel('New password').fill('orchard-bollard-tide');
    await page.getByLabel('Type it again').fill('orchard-bollard-tide');
    await screenshotBothWidths(page, 'links-05-password-reset');
    await page.getByRole('button', { name: 'Save the new password' }).click();

    await page.waitForURL((url) => url.pathname === '/signin' && url.searchParams.has('reset'));
    await page.getByText('Your password is changed').waitFor();
    await page.getByLabel('E-mail').first().fill(org.auditor.email);
    await page.getByLabel('Password').fill('orchard-bollard-tide');
    await page.getByRole('button', { name: 'Sign in', exact: true }).click();
    await page.waitForURL((url) => url.pathname === '/');
    expect(await hasSessionCookie()).toBe(true);
  });
});
