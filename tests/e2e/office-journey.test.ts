/**
 * The office's journey in Debian's chromium: find a signed assessment in the archive in a few
 * keystrokes, export the filtered set as a ZIP, prove the downloaded PDF genuine on the public
 * verification page, and see the gate on the re-inspection list. Screenshots at 360 and
 * 1280 px into tests/e2e/screenshots/office-*.png.
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from '../integration/support/fixtures';
import { readZip } from '../integration/support/archive';
import { seedScoredAssessment } from '../integration/support/signing-seed';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';

let org: FixtureOrganisation;
let office: TestClient;
let browser: BrowserSession;
let assessmentId: string;
let clientName: string;

/** Sends for signature through the API and signs through the public link, as the owner would. */
async function signedAssessment(): Promise<string> {
  const seeded = await seedScoredAssessment(
    testDb(),
    { id: org.id, auditorId: org.auditor.id, clientId: org.clientId },
    { dataDir: inject('dataDir'), photos: 1 },
  );
  const since = Date.now() - 50;
  expect(
    (await office.json('POST', `/api/assessments/${seeded.assessmentId}/send-for-signature`, {})).status,
  ).toBe(202);
  const catcher = inject('catcherUrl');
  let link: URL | undefined;
  for (
    const deadline = Date.now() + 15_000;
    !link && Date.now() < deadline;
    await new Promise((r) => setTimeout(r, 150))
  ) {
    const list = (await (await fetch(`${catcher}/messages`)).json()) as Array<{
      id: string;
      subject: string;
      receivedAt: string;
    }>;
    const mail = list.find(
      (m) => m.subject.startsWith('Please read and sign') && Date.parse(m.receivedAt) >= since,
    );
    if (mail)
      link = new URL(
        /https?:\/\/\S+\/sign\/[A-Za-z0-9_-]{43}/.exec(
          ((await (await fetch(`${catcher}/messages/${mail.id}`)).json()) as { text: string }).text,
        )![0],
      );
  }
  if (!link) throw new Error('the signing e-mail did not arrive');
  const token = link.pathname.split('/').at(-1)!;
  const shown = Buffer.from(
    await (await fetch(`${inject('baseUrl')}/api/sign/${token}/report.pdf`)).arrayBuffer(),
  );
  const res = await fetch(`${inject('baseUrl')}/api/sign/${token}/submit`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: inject('baseUrl') },
    body: JSON.stringify({
      name: 'Thea Marlowe',
      consent: true,
      intent: true,
      acknowledgedCautions: seeded.result.findings.filter((f) => f.outcome === 'fail').map((f) => f.ruleId),
      shownPdfSha256: createHash('sha256').update(shown).digest('hex'),
      signature: { method: 'typed' },
    }),
  });
  expect(res.status, await res.clone().text()).toBe(201);
  return seeded.assessmentId;
}

beforeAll(async () => {
  org = await createOrganisation('office-journey');
  office = await signIn(org.office.email, fixturePassword);
  assessmentId = await signedAssessment();
  clientName = (await testDb()('clients').where({ id: org.clientId }).first('name')).name;
  browser = await launchBrowser(inject('baseUrl'));
}, 120_000);

afterAll(async () => {
  await browser?.close();
});

describe("the office's journey", () => {
  it('signs in and finds the signed assessment in the archive by a few letters of the client', async () => {
    const { page } = browser;
    await page.goto('/signin?next=/archive');
    await page.locator('#email').fill(org.office.email);
    await page.locator('#password').fill(fixturePassword);
    await page.getByRole('button', { name: 'Sign in', exact: true }).click();
    await page.getByRole('heading', { name: 'Archive' }).waitFor();
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    const needle = clientName.split(' ').at(-1)!.slice(0, 8);
    await page.getByLabel('Search client, address or gate').fill(needle);
    await page.waitForURL(/q=/);
    await page.getByText('1 assessment matches').waitFor();
    expect(await page.getByRole('link', { name: /Driveway gate/ }).count()).toBeGreaterThan(0);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'office-01-archive-search', { fullPage: true });
  });

  it('exports the filtered set as a ZIP holding the signed PDF and a CSV index', async () => {
    const { page } = browser;
    const [download] = await Promise.all([
      page.waitForEvent('download'),
      page.getByRole('link', { name: 'Export signed PDFs (ZIP)' }).click(),
    ]);
    const zip = readZip(fs.readFileSync((await download.path())!));
    const names = [...zip.keys()];
    expect(names.some((n) => n.endsWith('.csv'))).toBe(true);
    const pdfName = names.find((n) => n.endsWith('.pdf'))!;
    expect(pdfName).toBeDefined();
    const stored = await testDb()('documents')
      .where({ assessment_id: assessmentId, kind: 'signed_report' })
      .first('sha256');
    const pdf = zip.get(pdfName)!;
    expect(createHash('sha256').update(pdf).digest('hex')).toBe(stored.sha256);
    fs.writeFileSync(`${inject('dataDir')}/office-journey.pdf`, pdf);
  });

  it('proves the downloaded PDF genuine on the public verification page, and a changed copy not', async () => {
    const { page } = browser;
    const path = `${inject('dataDir')}/office-journey.pdf`;
    await page.goto('/verify');
    await page.getByLabel('The report PDF').setInputFiles(path);
    await page.getByRole('button', { name: 'Check' }).click();
    await page.getByRole('heading', { name: /Genuine/ }).waitFor();
    expect(await page.getByText(org.name).count()).toBeGreaterThan(0);
    await screenshotBothWidths(page, 'office-02-verified', { fullPage: true });

    const altered = fs.readFileSync(path);
    altered[Math.floor(altered.length / 2)] ^= 0x01;
    fs.writeFileSync(`${path}.altered.pdf`, altered);
    await page.goto('/verify');
    await page.getByLabel('The report PDF').setInputFiles(`${path}.altered.pdf`);
    await page.getByRole('button', { name: 'Check' }).click();
    await page.getByRole('heading', { name: 'No match' }).waitFor();
  });

  it('sees the gate on the re-inspection list with its due date', async () => {
    const { page } = browser;
    // This organisation re-inspects monthly, so a gate signed today is due within 60 days.
    await testDb()('organisations').where({ id: org.id }).update({ reinspection_months: 1 });
    await page.goto('/archive/reinspection?within=60');
    await page.getByRole('heading', { name: 'Re-inspection' }).waitFor();
    await page.waitForLoadState('networkidle');
    expect(await page.getByText('Driveway gate').count()).toBeGreaterThan(0);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'office-03-reinspection', { fullPage: true });
  });
});
