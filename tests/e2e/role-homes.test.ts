/**
 * After signing in, each role lands on its own home, in Debian's chromium: the auditor on
 * today's visits and open drafts; the office on what waits for it (signatures, overdue
 * re-inspections, mail that did not go out, drafts of everyone); the owner on the same plus
 * staff and rulesets. The office's assessment list counts everyone's drafts, not only its own.
 * The owner's background jobs page lists queued and given-up work with its retry.
 * Screenshots into tests/e2e/screenshots/home-*.png and jobs-*.png.
 */
import PgBoss from 'pg-boss';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createPrng, sampleDocuments, sampleGate } from '../support/archive-samples';
import {
  addClient,
  addGate,
  addSite,
  fileAssessment,
  publishedVersion,
} from '../integration/support/archive';
import { createOrganisation, testDb, type FixtureOrganisation } from '../integration/support/fixtures';
import { bossDb } from '../../src/lib/server/jobs/boss';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';
import { signInThroughForm } from './support/sign-in';

let org: FixtureOrganisation;
let browser: BrowserSession;
let awaitingId: string;
let failedMailId: string;

beforeAll(async () => {
  org = await createOrganisation('role homes');
  const version = await publishedVersion('north-american-gate', '2026.1');
  const prng = createPrng(99);
  const gate = { ...sampleGate(prng), kind: 'swing' as const, openingDirection: 'pull_to_open' as const };
  const client = await addClient(org.id, 'Brackenridge Stables');
  const site = await addSite(org.id, client, '9 Brackenridge Lane', 'Eastholm', 1);
  const gates = await Promise.all(
    ['Yard gate', 'Paddock gate', 'Lane gate'].map((label) => addGate(org.id, site, label, gate)),
  );
  const base = { organisationId: org.id, auditorId: org.auditor.id, gate, usageClass: 1, version };
  const docs = () => sampleDocuments(prng, version.loaded.version, 0.9);
  // Today's draft of the auditor; one waiting for a signature; a gate last signed 14 months ago.
  await fileAssessment({
    ...base,
    gateId: gates[0],
    status: 'draft',
    visitedOn: new Date().toISOString(),
    documents: docs(),
  });
  ({ id: awaitingId } = await fileAssessment({
    ...base,
    gateId: gates[1],
    status: 'awaiting_signature',
    visitedOn: new Date(Date.now() - 3 * 86_400_000).toISOString(),
    documents: docs(),
  }));
  await fileAssessment({
    ...base,
    gateId: gates[2],
    visitedOn: new Date(Date.now() - 425 * 86_400_000).toISOString(),
    documents: docs(),
  });
  // A sign request the mail server refused until the outbox gave up.
  [{ id: failedMailId }] = await testDb()('outbox_messages')
    .insert({
      organisation_id: org.id,
      kind: 'sign_request',
      to_addresses: ['stables@clients.test'],
      subject: 'Please read and sign',
      text_body: 'Please read and sign.',
      status: 'failed',
      attempts: 8,
      last_error: '550 mailbox unavailable',
      related_type: 'assessment',
      related_id: awaitingId,
      channel: 'e2e-role-homes',
    })
    .returning('id');
  browser = await launchBrowser(inject('baseUrl'));
});

afterAll(async () => {
  await browser?.close();
});

async function sectionTitles(): Promise<string[]> {
  return (await browser.page.locator('main h2').allInnerTexts()).map((t) => t.trim());
}

describe('each role lands on its own home', () => {
  it("the auditor lands on today's visits and open drafts", async () => {
    const { page } = browser;
    await signInThroughForm(page, org.auditor.email);
    expect(new URL(page.url()).pathname).toBe('/');
    await page.getByRole('heading', { name: 'Today', level: 1 }).waitFor();
    const titles = await sectionTitles();
    expect(titles).toContain('Your visits today (1)');
    expect(titles).toContain('Your open drafts (1)');
    expect(titles.some((t) => t.startsWith('Awaiting signature'))).toBe(false);
    await page
      .getByRole('link', { name: /Yard gate · Brackenridge Stables/ })
      .first()
      .waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'home-01-auditor', { fullPage: true });
  });

  it('the office lands on signatures, overdue re-inspections and undelivered mail, and sees everyone’s drafts', async () => {
    const { page } = browser;
    await signInThroughForm(page, org.office.email);
    await page.getByRole('heading', { name: 'The office today', level: 1 }).waitFor();
    const titles = await sectionTitles();
    expect(titles).toEqual(
      expect.arrayContaining([
        'Awaiting signature (1)',
        'Re-inspections overdue (1)',
        'Mail not delivered (1)',
        'Drafts in progress (1)',
      ]),
    );
    expect(titles.some((t) => t === 'Staff' || t === 'Rulesets')).toBe(false);
    await page.locator('[data-home="mail"]').getByText('Given up after 8 tries.').waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'home-02-office', { fullPage: true });
    await page.goto('/assessments');
    await page.getByRole('heading', { name: 'Open drafts (1)' }).waitFor();
  });

  it('the owner lands on the same, with staff and rulesets', async () => {
    const { page } = browser;
    await signInThroughForm(page, org.owner.email);
    await page.getByRole('heading', { name: /today$/, level: 1 }).waitFor();
    const titles = await sectionTitles();
    expect(titles).toEqual(
      expect.arrayContaining([
        'Awaiting signature (1)',
        'Re-inspections overdue (1)',
        'Mail not delivered (1)',
        'Staff',
        'Rulesets',
      ]),
    );
    await page
      .locator('[data-home="staff"]')
      .getByText(/4 people can sign in/)
      .waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'home-03-owner', { fullPage: true });
  });
});

describe("the owner's background jobs", () => {
  it('lists queued and given-up work readably on a phone and a desk, with retry for the dead message', async () => {
    // Jobs on a channel of their own, so the test server's workers leave them where they are.
    const channel = 'e2ejobspage';
    const db = testDb();
    await db.raw('select pgboss.latchwell_ensure_queues(?)', [channel]);
    const boss = new PgBoss({ db: bossDb(db), migrate: false });
    await boss.send(
      `mail-dead.${channel}`,
      { organisationId: org.id, outboxId: failedMailId, lastError: '550 mailbox unavailable' },
      {},
    );
    await boss.send(
      `mail.${channel}`,
      { organisationId: org.id, outboxId: failedMailId },
      { startAfter: new Date(Date.now() + 3 * 3_600_000) },
    );
    await boss.send(
      `reinspection-reminders.${channel}`,
      { organisationId: org.id },
      { startAfter: new Date(Date.now() + 26 * 3_600_000) },
    );
    const { page } = browser;
    await signInThroughForm(page, org.owner.email);
    await page.goto('/jobs');
    await page.getByRole('heading', { name: 'Background jobs', level: 1 }).waitFor();
    const dead = page.locator('[data-job-status="dead"]');
    await dead.getByRole('button', { name: 'Retry: E-mail, Please read and sign' }).waitFor();
    // Said once, in words: "Given up", the kind of job, what it is about, when it was given up.
    expect(await dead.innerText()).toMatch(
      /^Given up\s+E-mail\s+Please read and sign\s+Given up \w{3} \d{1,2}, \d{4}/,
    );
    expect(await page.locator('[data-job-status="queued"]').count()).toBe(2);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'jobs-01-owner', { fullPage: true });
  });
});
