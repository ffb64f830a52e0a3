/** Signing in from the browser tests: staff through the sign-in form, anyone by a session cookie. */
import type { BrowserContext, Page } from 'playwright-core';
import { fixturePassword, type TestClient } from '../../integration/support/fixtures';

/** Signs a member of staff in through the form and waits for the page it lands on. */
export async function signInThroughForm(page: Page, email: string, next?: string): Promise<void> {
  await page.context().clearCookies();
  await page.goto(next ? `/signin?next=${encodeURIComponent(next)}` : '/signin');
  await page.locator('#email').fill(email);
  await page.locator('#password').fill(fixturePassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/signin'));
}

/** Gives the browser the session of a client signed in over HTTP (e.g. a homeowner's link sign-in). */
export async function useSessionOf(
  context: BrowserContext,
  client: TestClient,
  baseUrl: string,
): Promise<void> {
  const host = new URL(baseUrl).hostname;
  await context.clearCookies();
  await context.addCookies(
    client.cookie.split('; ').map((pair) => {
      const eq = pair.indexOf('=');
      return { name: pair.slice(0, eq), value: pair.slice(eq + 1), domain: host, path: '/' };
    }),
  );
}
