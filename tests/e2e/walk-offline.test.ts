/**
 * A draft opened once works without signal, in Debian's chromium at phone width: the service
 * worker (workbox, precache from the build) keeps the page, its scripts (the photo reducer and
 * the lazily loaded panels too) and the pinned ruleset's questions; the page reloads and a new
 * tab reopens it offline with its answers; an edit and a photo made offline reach the server
 * when the signal returns. It keeps nothing but scripts, walk pages and photo files, and drops
 * the pages when the person signs out. Screenshots: tests/e2e/screenshots/walk-offline-*.png.
 */
import fs from 'node:fs';
import { afterAll, beforeAll, beforeEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { currentVersion, insertDraft, seedDirectory } from '../integration/support/domain';
import {
  createOrganisation,
  fixturePassword,
  testDb,
  type FixtureOrganisation,
} from '../integration/support/fixtures';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';
import { cameraJpeg } from './support/samples';

let org: FixtureOrganisation;
let session: BrowserSession;
let page: Page;
let draftId: string;
let walkUrl: string;

/** Every URL in the page's Cache Storage, by cache name. */
function cachedUrls(p: Page): Promise<Record<string, string[]>> {
  return p.evaluate(async () => {
    const out: Record<string, string[]> = {};
    for (const name of await caches.keys())
      out[name] = (await (await caches.open(name)).keys()).map(
        (r) => `${r.method} ${new URL(r.url).pathname}${new URL(r.url).search}`,
      );
    return out;
  });
}

beforeAll(async () => {
  org = await createOrganisation('walk offline e2e');
  const dir = await seedDirectory(org);
  const version = await currentVersion('north-american-gate');
  draftId = await insertDraft(org.id, dir.gateId, org.auditor.id, version.id, {
    answers: { latchFitted: { value: 'no' } },
  });
  walkUrl = `/assessments/${draftId}/walk`;
  session = await launchBrowser(inject('baseUrl'));
  page = session.page;
  await page.goto(`/signin?next=${walkUrl}`);
  await page.locator('#email').fill(org.auditor.email);
  await page.locator('#password').fill(fixturePassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL(/\/walk$/);
});

afterAll(async () => {
  await session?.close();
});

beforeEach(({ task, onTestFailed }) => {
  onTestFailed(async () => {
    fs.mkdirSync('test-results', { recursive: true });
    await page
      ?.screenshot({
        path: `test-results/${task.name.replace(/[^a-z0-9]+/gi, '-').slice(0, 60)}.png`,
        fullPage: true,
      })
      .catch(() => {});
  });
});

describe('the walk-through without signal', () => {
  it('says when the draft is kept on the phone, and keeps only scripts, walk pages and photo files', async () => {
    const kept = page.locator('#walk-offline');
    await kept.waitFor({ state: 'visible', timeout: 60_000 });
    await expect(kept.textContent()).resolves.toMatch(/Kept on this phone: opens without signal/);
    const cached = await cachedUrls(page);
    const all = Object.values(cached).flat();
    expect(all).toContain(`GET ${walkUrl}`);
    // Every module script the page loaded is in the precache.
    const scripts = await page.evaluate(() =>
      [...document.querySelectorAll('script[type=module][src]')].map(
        (s) => new URL((s as HTMLScriptElement).src).pathname,
      ),
    );
    for (const script of scripts) expect(all.some((u) => u.startsWith(`GET ${script}`))).toBe(true);
    // No other page, no API answer but photo files, never a POST.
    for (const entry of all) {
      expect(entry).toMatch(
        /^GET (\/_astro\/|\/favicon\.svg|\/assessments\/[0-9a-f-]{36}\/walk$|\/api\/assessments\/[0-9a-f-]{36}\/photos\/[0-9a-f-]{36}\?size=(thumb|display)$|\/__walk-owner$)/,
      );
    }
  });

  it('reloads and reopens offline with its answers, takes an edit and a photo, and syncs them when the signal returns', async () => {
    await session.context.setOffline(true);
    await page.reload();
    await page.locator('[data-save-state]').waitFor();
    await expect(page.getByRole('heading', { level: 1 }).textContent()).resolves.toBeTruthy();
    await expect(page.locator('#q-latchFitted input[value=no]').isChecked()).resolves.toBe(true);
    // The force-test panel is loaded after hydration: its script came from the precache.
    await page.locator('#item-force').getByLabel('Gap left at the point').waitFor();
    expect(await seriousAxeViolations(page, ['header', '#q-latchFitted'])).toEqual([]);
    await screenshotBothWidths(page, 'walk-offline-reloaded');

    // A second tab, as after the browser was closed and the draft opened again from history.
    const reopened = await session.context.newPage();
    await reopened.goto(walkUrl);
    await expect(reopened.locator('#q-latchFitted input[value=no]').isChecked()).resolves.toBe(true);
    await reopened.close();

    await page.locator('#q-positiveStopClosed').locator('label', { hasText: /^Yes$/ }).click();
    const stop = page.locator('#q-positiveStopClosed');
    // The photo reducer is loaded on demand: from the precache too.
    await stop
      .locator('input[data-photo-pick]')
      .setInputFiles({ name: 'stop.jpg', mimeType: 'image/jpeg', buffer: await cameraJpeg('#3b5370') });
    await stop.getByText('waiting').waitFor();
    await page.locator('[data-save-state="waiting"]').waitFor();
    await screenshotBothWidths(page, 'walk-offline-edit-waiting', { focus: '#q-positiveStopClosed' });
    expect(
      (await testDb()('assessments').where({ id: draftId }).first()).answers.positiveStopClosed,
    ).toBeUndefined();

    await session.context.setOffline(false);
    await page.locator('[data-save-state="saved"]').waitFor({ timeout: 30_000 });
    await stop.locator('img[src*="size=thumb"]').waitFor({ timeout: 20_000 });
    const stored = await testDb()('assessments').where({ id: draftId }).first();
    expect(stored.answers.positiveStopClosed).toEqual({ value: 'yes' });
    expect(stored.answers.latchFitted).toEqual({ value: 'no' });
    expect(
      await testDb()('assessment_photos')
        .where({ assessment_id: draftId, item_key: 'positiveStopClosed' })
        .count('* as n')
        .first(),
    ).toEqual({ n: '1' });
  });

  it('drops the kept pages and photos when the person signs out', async () => {
    await page.reload();
    await page.locator('#walk-offline').waitFor({ state: 'visible', timeout: 60_000 });
    expect(Object.keys(await cachedUrls(page))).toContain('latchwell-walk-pages');
    await page.evaluate(() =>
      (document.querySelector('form[action="/auth/signout"]') as HTMLFormElement).submit(),
    );
    await page.waitForURL((url) => !url.pathname.endsWith('/walk'));
    await expect
      .poll(async () =>
        Object.keys(await cachedUrls(page)).filter((name) => name.startsWith('latchwell-walk-')),
      )
      .toEqual([]);
    // Without signal the draft is no longer there for whoever holds the phone next.
    await session.context.setOffline(true);
    const next = await session.context.newPage();
    await next.goto(walkUrl).catch(() => null);
    await expect(next.locator('#q-latchFitted').count()).resolves.toBe(0);
    await next.close();
    await session.context.setOffline(false);
  });
});
