/**
 * The auditor's walk at a gate, in Debian's chromium at phone width: sign in, add a site and a
 * swing gate, answer the walk-through, add a photo and a force trace, check the swing geometry,
 * lose the signal and keep answering, reload without signal, get it back, see everything
 * synced, submit and see the verdict. Every page is checked with axe-core and photographed at
 * 360 px and 1280 px (tests/e2e/screenshots).
 */
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, inject, it } from 'vitest';
import type { Locator, Page } from 'playwright-core';
import { currentVersion, insertDraft, seedDirectory } from '../integration/support/domain';
import {
  createOrganisation,
  fixturePassword,
  testDb,
  type FixtureOrganisation,
} from '../integration/support/fixtures';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';
import { cameraJpeg, damagedTraceCsv, passingTraceCsv } from './support/samples';

interface Question {
  key: string;
  section: string;
  answerType: string;
  gateKinds: string[];
  askWhen?: unknown;
  options?: { value: string }[];
}

// The draft is pinned to the family's current version, so its questions are the ones shown.
const ruleset = JSON.parse(
  fs.readFileSync(path.resolve('rulesets/north-american-gate/2026.2.json'), 'utf8'),
) as { questions: Question[] };
const swingQuestions = ruleset.questions.filter(
  (q) => q.gateKinds.includes('swing') && q.askWhen === undefined,
);
/** Answered after the signal drops. */
const offlineKeys = new Set(swingQuestions.filter((q) => q.section === 'handover').map((q) => q.key));

let org: FixtureOrganisation;
let session: BrowserSession;
let page: Page;

/** axe-core (the whole page, or the parts a step changed) and screenshots at both widths. */
async function checkPage(
  name: string,
  options: { fullPage?: boolean; focus?: string; only?: string[] } = {},
) {
  expect(await seriousAxeViolations(page, options.only), `axe on ${name}`).toEqual([]);
  await screenshotBothWidths(page, name, options);
}

async function answer(card: Locator, q: Question) {
  if (q.answerType === 'yes_no_na') await card.locator('label', { hasText: /^Yes$/ }).click();
  else if (q.answerType === 'choice') await card.getByRole('radiogroup').locator('label').first().click();
  else if (q.answerType === 'date') await card.locator('input[type=date]').fill('2024-05-01');
  else if (q.answerType === 'text') await card.locator('input[type=text]').fill('as found');
  else {
    const input = card.locator('input[inputmode=decimal]').first();
    await input.fill(q.answerType === 'length' ? '2-1/4' : '2');
    await input.blur();
  }
}

async function waitSaved() {
  await page.locator('[data-save-state="saved"]').waitFor({ timeout: 30_000 });
}

beforeAll(async () => {
  org = await createOrganisation('walk e2e');
  await testDb()('organisations').where({ id: org.id }).update({ display_units: 'imperial' });
  // A draft from yesterday's visit elsewhere, so the auditor's list is not empty on first sight.
  const dir = await seedDirectory(org);
  const version = await currentVersion('north-american-gate');
  await insertDraft(org.id, dir.gateId, org.auditor.id, version.id, {
    visited_on: new Date(Date.now() - 86_400_000),
  });
  session = await launchBrowser(inject('baseUrl'));
  page = session.page;
});

afterAll(async () => {
  await session?.close();
});

// A failing step leaves a full-page picture of what the browser showed (test-results/, not committed).
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

describe('the auditor walks a swing gate on a phone', () => {
  let assessmentId = '';

  it('signs in and sees their assessments', async () => {
    await page.goto('/signin?next=/assessments');
    await checkPage('walk-01-sign-in');
    await page.locator('#email').fill(org.auditor.email);
    await page.locator('#password').fill(fixturePassword);
    await page.getByRole('button', { name: 'Sign in', exact: true }).click();
    await page.waitForURL(/\/assessments$/);
    await expect(page.getByRole('heading', { name: 'Assessments', level: 1 }).isVisible()).resolves.toBe(
      true,
    );
    await checkPage('walk-02-assessments');
  });

  it('adds a site to the client and a swing gate to the site', async () => {
    await page.getByRole('link', { name: 'Start a new assessment' }).click();
    await page.waitForURL(/\/clients$/);
    await checkPage('walk-03-clients');
    await page.getByRole('link', { name: /Household walk-e2e/ }).click();
    await page.waitForURL(/\/clients\/[0-9a-f-]+$/);
    await page.getByLabel('Street address').fill('7 Quarry Bend');
    await page.getByLabel('Town or city').fill('Hollin Vale');
    await page.getByLabel('State or region').fill('OR');
    await page.getByLabel('Postal code').fill('97999');
    await checkPage('walk-04-new-site');
    await page.getByRole('button', { name: 'Add the site' }).click();
    await page.waitForURL(/\/sites\/[0-9a-f-]+$/);

    await page.getByLabel('Name of the gate').fill('Driveway gate');
    await page.getByLabel('Opening width', { exact: true }).fill('12');
    await page.getByLabel('Leaf weight', { exact: true }).fill('300');
    await page.getByLabel('Listed to the safety standard?').selectOption('true');
    await page.getByLabel('Automatic closing on?').selectOption('true');
    await page.getByLabel('Made on (from its label)').fill('2019-05-01');
    await page.getByRole('button', { name: 'Add the gate' }).click();
    await page.getByRole('heading', { name: 'Driveway gate' }).waitFor();
    await checkPage('walk-05-site-with-gate');
    const gate = await testDb()('gates').where({ organisation_id: org.id, label: 'Driveway gate' }).first();
    expect(gate).toMatchObject({
      kind: 'swing',
      opening_direction: 'pull_to_open',
      width_mm: 3658,
      weight_kg: 136,
    });
    expect(gate.entered.width).toEqual({ value: 12, unit: 'ft' });
  });

  it('starts the walk-through and answers it, with a photo, a force trace and the swing geometry', async () => {
    await page.getByRole('button', { name: 'Start the walk-through' }).click();
    await page.waitForURL(/\/assessments\/[0-9a-f-]+\/walk$/);
    assessmentId = /assessments\/([0-9a-f-]+)\/walk/.exec(page.url())?.[1] ?? '';
    await waitSaved();
    await checkPage('walk-06-start');

    for (const prompt of [
      'Do people walk through the gateway?',
      'Are children or pets about?',
      'Can the public reach the gate?',
      'Does the ground slope across the gate’s travel?',
    ]) {
      await page.getByRole('radiogroup', { name: prompt }).locator('label', { hasText: 'No' }).click();
    }
    for (const q of swingQuestions) {
      if (offlineKeys.has(q.key)) continue;
      await answer(page.locator(`#q-${q.key}`), q);
    }

    // Keyboard only: arrow keys move the choice within a yes / no / N/A group.
    await page.locator('#q-placardsLegible input[value=yes]').focus();
    await page.keyboard.press('ArrowRight');
    await expect.poll(() => page.locator('#q-placardsLegible input[value=no]').isChecked()).toBe(true);
    await page.keyboard.press('ArrowLeft');
    await expect.poll(() => page.locator('#q-placardsLegible input[value=yes]').isChecked()).toBe(true);

    const hinge = page.locator('#q-hingeGapMm');
    await hinge
      .locator('input[data-photo-pick]')
      .setInputFiles({ name: 'hinge.jpg', mimeType: 'image/jpeg', buffer: await cameraJpeg() });
    await hinge.locator('img[src*="size=thumb"]').waitFor({ timeout: 20_000 });
    // Handing 16 MB to the browser takes a while on a busy machine.
    await hinge
      .locator('input[data-photo-pick]')
      .setInputFiles(
        { name: 'huge.jpg', mimeType: 'image/jpeg', buffer: Buffer.alloc(16 * 1024 * 1024, 1) },
        { timeout: 60_000 },
      );
    await expect(hinge.getByRole('alert').textContent()).resolves.toMatch(/16 MB; the limit is 15 MB/);
    await checkPage('walk-07-measurement-and-photo', {
      focus: '#q-hingeGapMm',
      only: ['#q-hingeGapMm', '[role=tablist]'],
    });

    const sensing = page.locator('#item-entrapment');
    await sensing.getByRole('button', { name: '+ Add a zone' }).click();
    await sensing.getByRole('button', { name: '+ Add a device' }).click();
    await sensing.getByRole('button', { name: '+ Add a device' }).click();
    await sensing.getByLabel('Type').nth(1).selectOption('B2');
    await checkPage('walk-08-entrapment', { focus: '#item-entrapment', only: ['#item-entrapment'] });

    const force = page.locator('#item-force');
    await force.getByLabel('Gap left at the point').fill('12');
    await force
      .locator('input[type=file]')
      .setInputFiles({ name: 'damaged.csv', mimeType: 'text/csv', buffer: Buffer.from(damagedTraceCsv()) });
    await expect(force.getByRole('alert').textContent()).resolves.toMatch(/Line 4: .*"0.004,zz"/);
    await force.locator('input[type=file]').setInputFiles({
      name: 'closing-edge-300.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from(passingTraceCsv()),
    });
    await force.getByText('Within the limits').waitFor();
    await force.locator('canvas').first().waitFor();
    await checkPage('walk-09-force-trace', { focus: '#item-force li', only: ['#item-force'] });

    const geometry = page.locator('#item-geometry');
    const figures: [string, string][] = [
      ['A: hinge to rear pivot', '6'],
      ['B: gate line to rear pivot', '7'],
      ['Gate bracket from the hinge', '40'],
      ['Ram length, fully retracted', '32'],
      ['Stroke', '14'],
    ];
    for (const [label, value] of figures) await geometry.getByLabel(label).fill(value);
    await geometry.getByText(/Closest the ram comes to the leaf/).waitFor();
    await geometry.locator('svg[role=img]').first().waitFor();
    await checkPage('walk-10-swing-geometry', {
      focus: '#item-geometry svg[role=img]',
      only: ['#item-geometry'],
    });

    await waitSaved();
    const stored = await testDb()('assessments').where({ id: assessmentId }).first();
    expect(stored.answers.hingeSideGuarded).toEqual({ value: 'yes' });
    expect(stored.measurements.hingeGapMm).toMatchObject({ value: 2.25, unit: 'in', canonical: 57.15 });
    expect(stored.observations.site).toEqual({
      pedestriansUseDriveway: false,
      childrenOrPetsPresent: false,
      publicAccess: false,
      slopeAcrossSwing: false,
    });
    expect(stored.observations.forceTests).toHaveLength(1);
    expect(stored.observations.swingGeometry).toMatchObject({ aMm: 152.4, bMm: 177.8, targetOpeningDeg: 90 });
    expect(stored.observations.entrapment).toEqual({
      zones: [{ zone: 'closing_edge', direction: 'closing' }],
      devices: [
        { type: 'B1', zone: 'closing_edge', direction: 'closing', monitored: true },
        { type: 'B2', zone: 'closing_edge', direction: 'closing', monitored: true },
      ],
    });
    expect(
      await testDb()('force_traces').where({ assessment_id: assessmentId }).count('* as n').first(),
    ).toEqual({ n: '1' });
  });

  it('keeps answering without signal, survives a reload offline, and syncs when the signal returns', async () => {
    // The page and its scripts must be on the phone before the signal goes.
    await page.waitForFunction(
      async () => {
        const registration = await navigator.serviceWorker.getRegistration('/assessments/');
        if (!registration?.active) return false;
        const scripts = [...document.querySelectorAll('script[type=module][src]')].map(
          (s) => (s as HTMLScriptElement).src,
        );
        const page = await caches.match(location.href, { ignoreSearch: true });
        const cached = await Promise.all(scripts.map((src) => caches.match(src)));
        return Boolean(page) && cached.every(Boolean);
      },
      undefined,
      { timeout: 20_000, polling: 500 },
    );

    await session.context.setOffline(true);
    for (const q of swingQuestions.filter((x) => offlineKeys.has(x.key)))
      await answer(page.locator(`#q-${q.key}`), q);
    const stop = page.locator('#q-positiveStopClosed');
    await stop
      .locator('input[data-photo-pick]')
      .setInputFiles({ name: 'stop.jpg', mimeType: 'image/jpeg', buffer: await cameraJpeg('#3b5370') });
    await stop.getByText('waiting').waitFor();
    await page.locator('[data-save-state="waiting"]').waitFor();
    await expect(page.locator('[data-save-state]').textContent()).resolves.toMatch(
      /changes? on this phone · offline/,
    );
    await checkPage('walk-11-offline-waiting', {
      focus: '#q-positiveStopClosed',
      only: ['#q-positiveStopClosed', '[data-save-state]'],
    });

    await page.reload();
    // Waiting, not loading: the island has read the device's edit queue.
    await page.locator('[data-save-state="waiting"]').waitFor();
    for (const key of offlineKeys)
      await expect(page.locator(`#q-${key} input[value=yes]`).isChecked()).resolves.toBe(true);
    await page.locator('#q-positiveStopClosed').getByText('waiting').waitFor();
    expect(
      (await testDb()('assessments').where({ id: assessmentId }).first()).answers.forceSetLowest,
    ).toBeUndefined();

    await session.context.setOffline(false);
    await waitSaved();
    await page.locator('#q-positiveStopClosed img[src*="size=thumb"]').waitFor({ timeout: 20_000 });
    const synced = await testDb()('assessments').where({ id: assessmentId }).first();
    for (const key of offlineKeys) expect(synced.answers[key], key).toEqual({ value: 'yes' });
    expect(
      await testDb()('assessment_photos').where({ assessment_id: assessmentId }).count('* as n').first(),
    ).toEqual({ n: '2' });
  });

  it('shows a change saved elsewhere that clashes with one made here, and keeps the value the auditor picks', async () => {
    await session.context.setOffline(true);
    await page.locator('#q-latchFitted').locator('label', { hasText: /^No$/ }).click();
    // Meanwhile the office corrects the same answer from another device.
    await testDb()('assessments')
      .where({ id: assessmentId })
      .update({
        answers: testDb().raw(`jsonb_set(answers, '{latchFitted}', '{"value":"na"}')`),
        row_version: testDb().raw('row_version + 1'),
      });
    await session.context.setOffline(false);

    const dialog = page.getByRole('dialog', { name: 'Saved elsewhere in the meantime' });
    await dialog.waitFor({ timeout: 30_000 });
    await expect(dialog.getByText('On this phone').isVisible()).resolves.toBe(true);
    await expect(page.locator('[data-save-state]').getAttribute('data-save-state')).resolves.toBe('conflict');
    expect((await testDb()('assessments').where({ id: assessmentId }).first()).answers.latchFitted).toEqual({
      value: 'na',
    });
    await checkPage('walk-12-conflict', { only: ['dialog'] });

    await dialog.getByRole('radio', { name: /On this phone/ }).check();
    await dialog.getByRole('button', { name: 'Keep these values' }).click();
    await waitSaved();
    expect((await testDb()('assessments').where({ id: assessmentId }).first()).answers.latchFitted).toEqual({
      value: 'no',
    });
  });

  it('shows the live result and what is left, then submits and shows the verdict', async () => {
    // The views are tabs: arrow keys move between them.
    await page.getByRole('tab', { name: 'Walk' }).focus();
    await page.keyboard.press('ArrowRight');
    await expect(page.getByRole('tab', { name: /To check/ }).getAttribute('aria-selected')).resolves.toBe(
      'true',
    );
    await checkPage('walk-13-to-check', { only: ['#panel-check'] });
    // One tap from the list to the item, with focus on it.
    await page.locator('#panel-check button').first().click();
    await expect(page.getByRole('tab', { name: 'Walk' }).getAttribute('aria-selected')).resolves.toBe('true');
    await expect(page.evaluate(() => document.activeElement?.id ?? '')).resolves.toMatch(/^(q-|item-)/);
    await page.getByRole('tab', { name: 'Result' }).click();
    await page.locator('[data-verdict]').first().waitFor({ timeout: 20_000 });
    await checkPage('walk-14-live-result');
    await page.getByRole('button', { name: 'Submit the assessment' }).click();
    // Submitting cannot be undone: a dialog says so first.
    await page.getByRole('dialog', { name: 'Submit this assessment?' }).waitFor();
    await page.getByRole('button', { name: 'Submit and score' }).click();
    await page.getByText('Submitted result').waitFor({ timeout: 20_000 });
    const verdict = await page.locator('[data-verdict]').getAttribute('data-verdict');
    const stored = await testDb()('assessments').where({ id: assessmentId }).first();
    expect(stored.status).toBe('scored');
    expect(stored.verdict).toBe(verdict);
    await expect(page.getByRole('heading', { name: /Failing items/ }).isVisible()).resolves.toBe(true);
    await checkPage('walk-15-submitted', { only: ['#panel-result', '[data-save-state]'] });

    await page.goto('/assessments');
    await page.getByRole('heading', { name: 'Recently submitted' }).waitFor();
    await expect(page.getByRole('link', { name: /Driveway gate/ }).count()).resolves.toBeGreaterThan(0);
    await checkPage('walk-16-assessments-after');
  });
});
