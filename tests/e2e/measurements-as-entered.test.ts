/**
 * Measurements as entered, for an imperial organisation, in Debian's chromium: a gate's size
 * typed in feet and inches (12' 6") is kept in feet and listed as "12 ft 6 in × 6 ft"; a walk-
 * through length typed as 6' 2" is kept in feet with its mm beside it; the ruleset page reads
 * UL 325's 1828.8 mm as "6 ft". Screenshots at 360 and 1280 px (measure-*.png); axe finds nothing.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { currentVersion, insertDraft, seedDirectory } from '../integration/support/domain';
import { createOrganisation, testDb, type FixtureOrganisation } from '../integration/support/fixtures';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';
import { signInThroughForm } from './support/sign-in';

let org: FixtureOrganisation;
let browser: BrowserSession;
let siteId = '';
let gateId = '';

beforeAll(async () => {
  org = await createOrganisation('measurements');
  await testDb()('organisations').where({ id: org.id }).update({ display_units: 'imperial' });
  const dir = await seedDirectory(org);
  siteId = dir.siteId;
  gateId = dir.gateId;
  browser = await launchBrowser(inject('baseUrl'));
  await signInThroughForm(browser.page, org.office.email, `/sites/${siteId}`);
});

afterAll(async () => {
  await browser?.close();
});

describe('measurements as entered, imperial organisation', () => {
  it("takes a gate's width as 12' 6\" and lists the gate as 12 ft 6 in × 6 ft", async () => {
    const { page } = browser;
    await page.goto(`/sites/${siteId}`);
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    await page.getByLabel('Name of the gate').fill('Paddock gate');
    await page.getByLabel('Opening width', { exact: true }).fill(`12' 6"`);
    await page.getByLabel('Leaf height', { exact: true }).fill('6');
    await page.getByRole('button', { name: 'Add the gate' }).click();
    await page.waitForURL(/\/sites\/[0-9a-f-]+\?gate=/);
    const gate = await testDb()('gates')
      .where({ organisation_id: org.id, label: 'Paddock gate' })
      .first('id', 'width_mm', 'height_mm', 'entered');
    // 12.5 ft = 3810 mm, 6 ft = 1828.8 mm (1 ft = 304.8 mm exactly).
    expect(gate.entered.width).toEqual({ value: 12.5, unit: 'ft' });
    expect(gate.entered.height).toEqual({ value: 6, unit: 'ft' });
    expect(Number(gate.width_mm)).toBeCloseTo(3810, 0);
    const card = page.locator(`#gate-${gate.id}`);
    await expect(card.innerText()).resolves.toContain('12 ft 6 in × 6 ft');
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'measure-01-gate-as-entered', { focus: `#gate-${gate.id}` });
  });

  it('takes a walk-through length as 6\' 2" and keeps it in feet, with the mm as a check', async () => {
    const { page } = browser;
    const version = await currentVersion('north-american-gate');
    const draft = await insertDraft(org.id, gateId, org.auditor.id, version.id);
    await page.goto(`/assessments/${draft}/walk`);
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    const card = page.locator('#q-controlDistanceMm');
    const input = card.locator('input[inputmode=decimal]').first();
    await input.fill(`6' 2"`);
    await input.blur();
    await page.locator('[data-save-state="saved"]').waitFor({ timeout: 30_000 });
    await expect
      .poll(
        async () => (await testDb()('assessments').where({ id: draft }).first('measurements')).measurements,
      )
      .toMatchObject({ controlDistanceMm: { value: 6.166667, unit: 'ft' } });
    // The picker shows feet chosen, and the metric figure underneath as a check on a unit slip.
    expect(await card.getByRole('radio', { name: 'ft' }).isChecked()).toBe(true);
    await expect(card.innerText()).resolves.toContain('= 1879.6 mm');
    // The field shows it as typed on site, not as a decimal of feet.
    await page.reload();
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    await expect.poll(() => card.locator('input[inputmode=decimal]').first().inputValue()).toBe(`6' 2"`);
    expect(await seriousAxeViolations(page, ['#q-controlDistanceMm'])).toEqual([]);
    await screenshotBothWidths(page, 'measure-02-walk-feet-and-inches', { focus: '#q-controlDistanceMm' });
  });

  it('reads ruleset limits in feet and inches: 1828.8 mm is "6 ft"', async () => {
    const { page } = browser;
    await page.goto('/rulesets/north-american-gate/2026.1');
    const main = await page.locator('main').innerText();
    expect(main).toContain('fixed object clearance is at least 16 in');
    expect(main).toMatch(/min distance: 6 ft/);
    expect(main).not.toContain('1828.8 mm');
    // UL 325: user controls at least 6 ft from the gate.
    await expect(page.locator('[id="rule-controls.distance"]').innerText()).resolves.toMatch(/6 ft/);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'measure-03-ruleset-imperial', {
      focus: '[id="rule-controls.distance"]',
    });
  });
});
