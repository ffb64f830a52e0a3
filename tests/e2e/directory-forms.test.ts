/**
 * The client, site and gate forms in Debian's chromium: every usage class can be chosen and
 * saved (the chosen one shows as selected), and a gate's operator facts survive an edit.
 * Screenshots at 360 and 1280 px into tests/e2e/screenshots/forms-*.png; axe finds nothing.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createOrganisation, testDb, type FixtureOrganisation } from '../integration/support/fixtures';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';
import { signInThroughForm } from './support/sign-in';

let org: FixtureOrganisation;
let browser: BrowserSession;

beforeAll(async () => {
  org = await createOrganisation('directory forms');
  browser = await launchBrowser(inject('baseUrl'));
  await signInThroughForm(browser.page, org.office.email, '/clients');
});

afterAll(async () => {
  await browser?.close();
});

describe('client, site and gate forms', () => {
  it('adds a client and shows it', async () => {
    const { page } = browser;
    await page.goto('/clients');
    await page.getByLabel('Name', { exact: true }).fill('Harrowgate Mews Residents');
    await page.getByLabel('Kind of client').selectOption('property_manager');
    await page.getByLabel('E-mail for reports and signing').fill('mews@clients.test');
    await page.getByRole('button', { name: 'Add the client' }).click();
    await page.waitForURL(/\/clients\/[0-9a-f-]+$/);
    await page.getByRole('heading', { name: 'Harrowgate Mews Residents' }).waitFor();
    const row = await testDb()('clients')
      .where({ organisation_id: org.id, name: 'Harrowgate Mews Residents' })
      .first('kind', 'contact_email');
    expect(row).toEqual({ kind: 'property_manager', contact_email: 'mews@clients.test' });
  });

  for (const [usageClass, title] of [
    [1, /Class I ·/],
    [2, /Class II ·/],
    [3, /Class III ·/],
    [4, /Class IV ·/],
  ] as const) {
    it(`saves a site with usage class ${usageClass} chosen by tapping it`, async () => {
      const { page } = browser;
      await page.goto(`/clients/${org.clientId}`);
      await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
      // The default (class I) shows as chosen before anything is tapped.
      expect(await page.getByRole('radio', { name: /Class I ·/ }).isChecked()).toBe(true);
      await page.getByLabel('Street address').fill(`${usageClass} Tanner's Row`);
      await page.getByLabel('Town or city').fill('Eastholm');
      await page.getByRole('radio', { name: title }).click();
      expect(await page.getByRole('radio', { name: title }).isChecked()).toBe(true);
      if (usageClass === 3) {
        expect(await seriousAxeViolations(page)).toEqual([]);
        await screenshotBothWidths(page, 'forms-01-site-class-chosen', { focus: 'fieldset' });
      }
      await page.getByRole('button', { name: 'Add the site' }).click();
      await page.waitForURL(/\/sites\/[0-9a-f-]+$/);
      const site = await testDb()('sites')
        .where({ organisation_id: org.id, address_line1: `${usageClass} Tanner's Row` })
        .first('usage_class');
      expect(site).toEqual({ usage_class: usageClass });
    });
  }

  it('adds a gate and keeps its operator facts through an edit', async () => {
    const { page } = browser;
    const site = await testDb()('sites')
      .where({ organisation_id: org.id, address_line1: "3 Tanner's Row" })
      .first('id');
    await page.goto(`/sites/${site.id}`);
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    await page.getByLabel('Name of the gate').fill('Yard slide gate');
    await page.getByLabel('Kind').selectOption('slide');
    await page.getByLabel('Opening width', { exact: true }).fill('6.5');
    await page.getByLabel('Opening width unit').selectOption('m');
    await page.getByLabel('Listed to the safety standard?').selectOption('true');
    await page.getByLabel('Automatic closing on?').selectOption('false');
    await page.getByLabel('Power').selectOption('mains_ac');
    await page.getByRole('button', { name: 'Add the gate' }).click();
    await page.waitForURL(/\/sites\/[0-9a-f-]+\?gate=/);
    const gate = await testDb()('gates')
      .where({ organisation_id: org.id, label: 'Yard slide gate' })
      .first('id', 'kind', 'width_mm', 'operator');
    expect(gate).toMatchObject({ kind: 'slide', width_mm: 6500 });
    expect(gate.operator).toMatchObject({ listed: true, automaticClosing: false, power: 'mains_ac' });

    await page.goto(`/gates/${gate.id}`);
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    expect(await page.getByLabel('Listed to the safety standard?').inputValue()).toBe('true');
    expect(await page.getByLabel('Automatic closing on?').inputValue()).toBe('false');
    await page.getByLabel('Leaves').selectOption('double');
    await page.getByRole('button', { name: 'Save the gate' }).click();
    await page.waitForURL(/\/sites\//);
    const saved = await testDb()('gates').where({ id: gate.id }).first('leaves', 'operator');
    expect(saved.leaves).toBe('double');
    expect(saved.operator).toMatchObject({ listed: true, automaticClosing: false, power: 'mains_ac' });
  });
});
