/**
 * The homeowner signs on a 360 px phone, in Debian's chromium: opens the e-mailed link with no
 * account, ticks each caution, consents, types a name, draws a signature with a finger (touch
 * pointer events on the signature pad) and signs. A second owner signs with the keyboard only,
 * using the typed name as the mark. No serious or critical axe violations on the page.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from '../integration/support/fixtures';
import { seedScoredAssessment } from '../integration/support/signing-seed';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';

let org: FixtureOrganisation;
let office: TestClient;
let browser: BrowserSession;

beforeAll(async () => {
  org = await createOrganisation('signing-phone');
  office = await signIn(org.office.email, fixturePassword);
  browser = await launchBrowser(inject('baseUrl'));
});

afterAll(async () => {
  await browser?.close();
});

/** Sends a fresh scored assessment and returns the path of the link from the caught e-mail. */
async function sentLink(): Promise<{ assessmentId: string; path: string; cautions: number }> {
  const seeded = await seedScoredAssessment(
    testDb(),
    { id: org.id, auditorId: org.auditor.id, clientId: org.clientId },
    { dataDir: inject('dataDir'), photos: 1 },
  );
  const since = Date.now() - 50;
  const res = await office.json('POST', `/api/assessments/${seeded.assessmentId}/send-for-signature`, {});
  expect(res.status).toBe(202);
  const catcher = inject('catcherUrl');
  const deadline = Date.now() + 15_000;
  for (;;) {
    const list = (await (await fetch(`${catcher}/messages`)).json()) as Array<{
      id: string;
      subject: string;
      receivedAt: string;
    }>;
    const mail = list.find(
      (m) => m.subject.startsWith('Please read and sign') && Date.parse(m.receivedAt) >= since,
    );
    if (mail) {
      const { text } = (await (await fetch(`${catcher}/messages/${mail.id}`)).json()) as { text: string };
      const url = new URL(/https?:\/\/\S+\/sign\/[A-Za-z0-9_-]{43}/.exec(text)![0]);
      return {
        assessmentId: seeded.assessmentId,
        path: url.pathname,
        cautions: seeded.result.findings.filter((f) => f.outcome === 'fail').length,
      };
    }
    if (Date.now() > deadline) throw new Error('the signing e-mail did not arrive');
    await new Promise((r) => setTimeout(r, 150));
  }
}

describe('signing on a phone', () => {
  it('signs with a finger-drawn signature at 360 px wide', async () => {
    const { assessmentId, path, cautions } = await sentLink();
    const { page } = browser;
    await page.goto(path);
    await page.getByRole('heading', { name: /Take out of automatic use/ }).waitFor();
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    expect(await seriousAxeViolations(page)).toEqual([]);
    // Nothing may force a sideways scroll on a 360 px screen.
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(360);
    await screenshotBothWidths(page, 'signing-01-page', { fullPage: true });

    const boxes = page.locator('fieldset').first().getByRole('checkbox');
    expect(await boxes.count()).toBe(cautions);
    for (let i = 0; i < cautions; i++) await boxes.nth(i).check();
    await page.getByRole('checkbox', { name: /sign this acknowledgement electronically/ }).check();
    await page.getByLabel('Your full name').fill('Imke Quillfeather');

    const pad = page.locator('canvas');
    await pad.scrollIntoViewIfNeeded();
    const box = (await pad.boundingBox())!;
    await page.mouse.move(box.x + 20, box.y + box.height * 0.7);
    await page.mouse.down();
    for (let x = 20; x < box.width - 20; x += 12)
      await page.mouse.move(box.x + x, box.y + box.height * (0.5 + 0.3 * Math.sin(x / 25)));
    await page.mouse.up();
    await page.getByText('Signature drawn.').waitFor();

    await page.getByRole('button', { name: 'Sign the report' }).click();
    await page.getByRole('heading', { name: 'Signed. Thank you.' }).waitFor({ timeout: 30_000 });
    await screenshotBothWidths(page, 'signing-02-signed');

    const signature = await testDb()('signatures')
      .where({ assessment_id: assessmentId })
      .first('signature_method', 'signature_image_key', 'user_agent');
    expect(signature.signature_method).toBe('drawn');
    expect(signature.signature_image_key).toMatch(/^[0-9a-f]{64}$/);
    expect(signature.user_agent).toMatch(/Chrome/);
    expect((await testDb()('assessments').where({ id: assessmentId }).first('status')).status).toBe('signed');

    // The journey ends in the owner's mailbox: the signed PDF, byte for byte the archived one.
    const stored = await testDb()('documents')
      .where({ assessment_id: assessmentId, kind: 'signed_report' })
      .first('sha256');
    const contact = (await testDb()('clients').where({ id: org.clientId }).first('contact_email'))
      .contact_email as string;
    const catcher = inject('catcherUrl');
    let delivered = false;
    for (
      const deadline = Date.now() + 20_000;
      !delivered && Date.now() < deadline;
      await new Promise((r) => setTimeout(r, 200))
    ) {
      const list = (await (await fetch(`${catcher}/messages`)).json()) as Array<{
        to: string[];
        attachments: Array<{ sha256: string }>;
      }>;
      delivered = list.some(
        (m) => m.to.includes(contact) && m.attachments.some((a) => a.sha256 === stored.sha256),
      );
    }
    expect(delivered, `signed PDF ${stored.sha256} in ${contact}'s mailbox`).toBe(true);
  });

  it('signs with the keyboard only, the typed name standing as the mark', async () => {
    const { assessmentId, path } = await sentLink();
    const { page } = browser;
    await page.goto(path);
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    // Tab to each checkbox and tick it with Space; the name field takes typing.
    const boxes = page.locator('form input[type=checkbox]');
    const count = await boxes.count();
    for (let i = 0; i < count; i++) {
      const label = await boxes.nth(i).evaluate((el) => el.closest('label')?.textContent ?? '');
      await boxes.nth(i).focus();
      await page.keyboard.press('Space');
      if (/cannot draw/.test(label)) break;
    }
    await page.getByLabel('Your full name').focus();
    await page.keyboard.type('Orrin Quillfeather');
    await expect(page.locator('canvas').count()).resolves.toBe(0);
    await page.getByRole('button', { name: 'Sign the report' }).focus();
    await page.keyboard.press('Enter');
    await page.getByRole('heading', { name: 'Signed. Thank you.' }).waitFor({ timeout: 30_000 });
    const signature = await testDb()('signatures')
      .where({ assessment_id: assessmentId })
      .first('signature_method', 'signature_image_key', 'signer_name');
    expect(signature).toMatchObject({
      signature_method: 'typed',
      signature_image_key: null,
      signer_name: 'Orrin Quillfeather',
    });
  });

  it('shows the office the signed report, its documents and the delivered e-mails', async () => {
    const { assessmentId } = await testDb()('signatures')
      .join('assessments', 'assessments.id', 'signatures.assessment_id')
      .where('assessments.organisation_id', org.id)
      .orderBy('signatures.signed_at')
      .first('signatures.assessment_id as assessmentId');
    const base = new URL(inject('baseUrl'));
    await browser.context.addCookies(
      office.cookie.split('; ').map((pair) => {
        const eq = pair.indexOf('=');
        return { name: pair.slice(0, eq), value: pair.slice(eq + 1), domain: base.hostname, path: '/' };
      }),
    );
    const { page } = browser;
    await page.goto(`/assessments/${assessmentId}/report`);
    await page.getByRole('heading', { name: /Signed by Imke Quillfeather/ }).waitFor();
    await page.getByRole('link', { name: 'Signed report' }).waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    await screenshotBothWidths(page, 'signing-04-office-view', { fullPage: true });
    await browser.context.clearCookies();
  });

  it('shows a clear page for a used link', async () => {
    const { path } = await sentLink();
    const { page } = browser;
    await page.goto(path);
    await page.waitForFunction(() => !document.querySelector('astro-island[ssr]'));
    await page.getByRole('checkbox', { name: /cannot draw/ }).check();
    for (const box of await page.locator('fieldset').first().getByRole('checkbox').all()) await box.check();
    await page.getByRole('checkbox', { name: /sign this acknowledgement electronically/ }).check();
    await page.getByLabel('Your full name').fill('Used Link');
    await page.getByRole('button', { name: 'Sign the report' }).click();
    await page.getByRole('heading', { name: 'Signed. Thank you.' }).waitFor({ timeout: 30_000 });
    const response = await page.goto(path);
    expect(response?.status()).toBe(409);
    await page.getByRole('heading', { name: 'This link cannot be used' }).waitFor();
    await screenshotBothWidths(page, 'signing-03-used-link');
  });
});
