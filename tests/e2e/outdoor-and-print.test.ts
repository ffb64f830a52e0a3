/**
 * Outdoor (high-contrast) mode and printing, in Debian's chromium: the switch is kept on the
 * device across pages and reloads and darkens text and lines; printing a report, the archive
 * list, a gate's history, a client and a site shows black on white with no navigation or
 * buttons and no table running off the page. Screenshots (print media emulated):
 * tests/e2e/screenshots/outdoor-*.png, print-*.png.
 */
import fs from 'node:fs';
import { afterAll, beforeAll, beforeEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { createPrng, sampleGate } from '../support/archive-samples';
import { extractPdfText } from '../support/pdf-text';
import {
  addClient,
  addGate,
  addSite,
  fileAssessment,
  publishedVersion,
} from '../integration/support/archive';
import {
  createOrganisation,
  fixturePassword,
  type FixtureOrganisation,
} from '../integration/support/fixtures';
import { desktopViewport, launchBrowser, phoneViewport, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';

let org: FixtureOrganisation;
let session: BrowserSession;
let page: Page;
let ids: { client: string; site: string; gate: string; signed: string; draft: string };

beforeAll(async () => {
  org = await createOrganisation('outdoor print e2e');
  const version = await publishedVersion('north-american-gate', '2026.1');
  const gate = {
    ...sampleGate(createPrng(4242)),
    kind: 'swing' as const,
    openingDirection: 'pull_to_open' as const,
  };
  const client = await addClient(org.id, 'Brackenfold Mews Residents');
  const site = await addSite(org.id, client, '4 Brackenfold Mews', 'Westerby', 2);
  const gateId = await addGate(org.id, site, 'Mews entrance gate with a long descriptive label', gate);
  const base = { organisationId: org.id, auditorId: org.auditor.id, gateId, gate, usageClass: 2, version };
  const signed = await fileAssessment({ ...base, visitedOn: '2026-05-04T10:00:00Z', prng: createPrng(7) });
  const draft = await fileAssessment({
    ...base,
    visitedOn: '2026-11-20T10:00:00Z',
    status: 'draft',
    prng: createPrng(8),
  });
  ids = { client, site, gate: gateId, signed: signed.id, draft: draft.id };
  session = await launchBrowser(inject('baseUrl'));
  page = session.page;
  await page.goto('/signin?next=/archive');
  await page.locator('#email').fill(org.owner.email);
  await page.locator('#password').fill(fixturePassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL(/\/archive$/);
}, 120_000);

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

const color = (p: Page, selector: string, property: 'color' | 'backgroundColor' | 'borderTopColor') =>
  p
    .locator(selector)
    .first()
    .evaluate((el, prop) => getComputedStyle(el)[prop], property);

describe('outdoor mode', () => {
  it('switches to high contrast, keeps the choice on this device across pages and reloads, and switches back', async () => {
    await page.goto(`/clients/${ids.client}`);
    const toggle = page.getByRole('button', { name: 'High contrast' }).first();
    await expect(toggle.getAttribute('aria-pressed')).resolves.toBe('false');
    const mutedBefore = await color(page, 'footer p', 'color');
    await toggle.click();
    await expect(toggle.getAttribute('aria-pressed')).resolves.toBe('true');
    await expect(page.evaluate(() => document.documentElement.classList.contains('outdoor'))).resolves.toBe(
      true,
    );
    // The footer's muted grey-blue text becomes near black; the paper becomes white.
    expect(mutedBefore).toBe('rgb(59, 83, 112)');
    await expect(color(page, 'footer p', 'color')).resolves.toBe('rgb(11, 19, 32)');
    await expect(color(page, 'html', 'backgroundColor')).resolves.toBe('rgb(255, 255, 255)');
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'outdoor-01-client');

    // Another page, after a reload: still on, before any script of the page runs.
    await page.goto(`/assessments/${ids.draft}/walk`);
    await page.locator('[data-save-state]').waitFor();
    await expect(page.evaluate(() => document.documentElement.classList.contains('outdoor'))).resolves.toBe(
      true,
    );
    await expect(
      page.getByRole('button', { name: 'High contrast' }).first().getAttribute('aria-pressed'),
    ).resolves.toBe('true');
    expect(await seriousAxeViolations(page, ['header', '#q-latchFitted'])).toEqual([]);
    await screenshotBothWidths(page, 'outdoor-02-walk');

    await page.getByRole('button', { name: 'High contrast' }).first().click();
    await page.reload();
    await expect(page.evaluate(() => document.documentElement.classList.contains('outdoor'))).resolves.toBe(
      false,
    );
    await expect(page.evaluate(() => localStorage.getItem('latchwell:outdoor'))).resolves.toBeNull();
  });
});

/** In print media: nothing interactive or navigational shows, text is black on white, and nothing is wider than the page. */
async function expectPrintable(p: Page) {
  await p.emulateMedia({ media: 'print' });
  const problems = await p.evaluate(() => {
    const found: string[] = [];
    const visible = (el: Element) => {
      const r = el.getBoundingClientRect();
      return (
        getComputedStyle(el).display !== 'none' &&
        getComputedStyle(el).visibility !== 'hidden' &&
        r.width > 0 &&
        r.height > 0
      );
    };
    for (const el of document.querySelectorAll(
      'nav, button:not(th button), .btn, .btn-secondary, input[type=file], [role=tablist], [role=search], body > footer',
    ))
      if (visible(el))
        found.push(`visible in print: <${el.tagName.toLowerCase()}> ${el.textContent?.trim().slice(0, 40)}`);
    for (const el of document.querySelectorAll('main h1, main p, main td, main th, main li'))
      if (visible(el) && getComputedStyle(el).color !== 'rgb(0, 0, 0)')
        found.push(`not black: <${el.tagName.toLowerCase()}> ${getComputedStyle(el).color}`);
    if (
      getComputedStyle(document.body).backgroundColor !== 'rgb(255, 255, 255)' &&
      getComputedStyle(document.body).backgroundColor !== 'rgba(0, 0, 0, 0)'
    )
      found.push(`body background ${getComputedStyle(document.body).backgroundColor}`);
    const pageWidth = document.documentElement.clientWidth;
    for (const table of document.querySelectorAll('table')) {
      const r = table.getBoundingClientRect();
      if (r.right > pageWidth + 1 || table.scrollWidth > Math.ceil(r.width) + 1)
        found.push(`table cut off: ${Math.round(r.right)} > ${pageWidth}`);
    }
    if (document.documentElement.scrollWidth > pageWidth + 1)
      found.push(`page wider than paper: ${document.documentElement.scrollWidth} > ${pageWidth}`);
    return found;
  });
  expect(problems).toEqual([]);
}

describe('printing', () => {
  const pages = () => [
    { name: 'print-01-report', url: `/assessments/${ids.signed}/report` },
    { name: 'print-02-archive', url: '/archive' },
    { name: 'print-03-gate-history', url: `/archive/gates/${ids.gate}` },
    { name: 'print-04-client', url: `/clients/${ids.client}` },
    { name: 'print-05-site', url: `/sites/${ids.site}` },
  ];

  it('prints reports, archive lists, clients and sites black on white, without navigation or buttons, tables whole', async () => {
    for (const { name, url } of pages()) {
      await page.emulateMedia({ media: 'screen' });
      const res = await page.goto(url);
      expect(res?.status(), url).toBe(200);
      // At both widths: a phone's print preview and a desktop's.
      for (const viewport of [phoneViewport, desktopViewport]) {
        await page.setViewportSize(viewport);
        await expectPrintable(page);
      }
      await page.setViewportSize(phoneViewport);
      await screenshotBothWidths(page, name, { fullPage: true });
    }
    await page.emulateMedia({ media: 'screen' });
  });

  it('renders the archive list to an A4 PDF with every column and no filter form', async () => {
    await page.goto('/archive');
    await page
      .getByRole('link', { name: /Mews entrance gate/ })
      .first()
      .waitFor();
    const headers = (await page.locator('table thead th').allTextContents())
      .map((h) => h.replace(/[^\p{L}\p{N} ]/gu, '').trim())
      .filter(Boolean);
    expect(headers.length).toBeGreaterThan(3);
    await page.emulateMedia({ media: 'print' });
    const pdf = await page.pdf({ format: 'A4', printBackground: false });
    fs.mkdirSync('test-results', { recursive: true });
    fs.writeFileSync('test-results/print-archive.pdf', pdf);
    const text = await extractPdfText(pdf);
    // Sort arrows are drawn with symbols the PDF text does not carry: the words are what count.
    for (const header of headers) expect(text, header).toContain(header);
    // A narrow print column may wrap a long name inside a word: compare without the spaces.
    expect(text.replace(/\s+/g, '')).toContain('BrackenfoldMewsResidents');
    expect(text).not.toContain('Search client, address or gate');
    await page.emulateMedia({ media: 'screen' });
  });
});
