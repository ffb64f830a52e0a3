/**
 * Photos over a weak signal, in Debian's chromium at phone width: the network is throttled
 * through the DevTools protocol, a large camera photo is reduced on the phone before it goes
 * (the server keeps the camera file's SHA-256, size, orientation and EXIF time), its progress
 * shows while it is sent, and an upload the server could not take is offered again with Retry.
 * Screenshots: tests/e2e/screenshots/walk-photo-*.png.
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import { afterAll, beforeAll, beforeEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import sharp from 'sharp';
import { currentVersion, insertDraft, seedDirectory } from '../integration/support/domain';
import {
  createOrganisation,
  fixturePassword,
  testDb,
  type FixtureOrganisation,
} from '../integration/support/fixtures';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths, seriousAxeViolations } from './support/page-checks';

let org: FixtureOrganisation;
let session: BrowserSession;
let page: Page;
let draftId: string;

/**
 * A 4000×3000 camera JPEG stored sideways (EXIF orientation 6) with the time it was taken:
 * a gradient with fine noise, so it weighs what a phone camera's file does (several MB).
 */
async function bigCameraJpeg(): Promise<Buffer> {
  const width = 4000;
  const height = 3000;
  const pixels = Buffer.alloc(width * height * 3);
  let seed = 7;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      seed = (seed * 1103515245 + 12345) & 0x7fffffff;
      const noise = (seed >> 16) % 48;
      const i = (y * width + x) * 3;
      pixels[i] = (x * 200) / width + noise;
      pixels[i + 1] = (y * 180) / height + noise;
      pixels[i + 2] = 90 + noise;
    }
  }
  return sharp(pixels, { raw: { width, height, channels: 3 } })
    .jpeg({ quality: 92 })
    .withExif({ IFD2: { DateTimeOriginal: '2026:11:30 09:15:00' } })
    .withMetadata({ orientation: 6 })
    .toBuffer();
}

beforeAll(async () => {
  org = await createOrganisation('walk photos e2e');
  const dir = await seedDirectory(org);
  const version = await currentVersion('north-american-gate');
  draftId = await insertDraft(org.id, dir.gateId, org.auditor.id, version.id);
  session = await launchBrowser(inject('baseUrl'));
  page = session.page;
  await page.goto(`/signin?next=/assessments/${draftId}/walk`);
  await page.locator('#email').fill(org.auditor.email);
  await page.locator('#password').fill(fixturePassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL(/\/walk$/);
  await page.locator('[data-save-state="saved"]').waitFor({ timeout: 30_000 });
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

describe('photos over a weak signal', () => {
  it('reduces a camera photo on the phone, shows its progress, and the server keeps the camera file hash', async () => {
    const camera = await bigCameraJpeg();
    expect(camera.byteLength).toBeGreaterThan(3 * 1024 * 1024);
    const cdp = await session.context.newCDPSession(page);
    await cdp.send('Network.enable');
    // About 0.4 Mbit/s up, 2 Mbit/s down, 300 ms round trips: a weak signal at the gate.
    await cdp.send('Network.emulateNetworkConditions', {
      offline: false,
      latency: 300,
      downloadThroughput: 250_000,
      uploadThroughput: 50_000,
    });

    const card = page.locator('#q-hingeGapMm');
    await card
      .locator('input[data-photo-pick]')
      .setInputFiles({ name: 'IMG_2041.jpg', mimeType: 'image/jpeg', buffer: camera });
    const progress = card.locator('[data-upload-progress]');
    await progress.waitFor({ timeout: 60_000 });
    // Part of it sent, not all: the bar moves while the photo goes.
    await expect
      .poll(
        async () => Number((await progress.getAttribute('data-upload-progress').catch(() => null)) ?? -1),
        { timeout: 30_000, interval: 100 },
      )
      .toBeGreaterThan(0);
    await screenshotBothWidths(page, 'walk-photo-progress', { focus: '#q-hingeGapMm' });
    expect(await seriousAxeViolations(page, ['#q-hingeGapMm'])).toEqual([]);
    await card.locator('img[src*="size=thumb"]').waitFor({ timeout: 90_000 });
    await cdp.send('Network.emulateNetworkConditions', {
      offline: false,
      latency: 0,
      downloadThroughput: -1,
      uploadThroughput: -1,
    });

    const row = await testDb()('assessment_photos')
      .where({ assessment_id: draftId, item_key: 'hingeGapMm' })
      .first();
    expect(row.source_sha256).toBe(createHash('sha256').update(camera).digest('hex'));
    expect(Number(row.source_bytes)).toBe(camera.byteLength);
    expect(row.source_orientation).toBe(6);
    // What crossed the weak signal is a fraction of the camera file.
    expect(row.original_bytes).toBeLessThan(camera.byteLength / 3);
    expect(row.original_sha256).not.toBe(row.source_sha256);
    // Read on the phone (the reduced copy carries no EXIF); the browser runs in UTC.
    expect(new Date(row.taken_at).toISOString()).toBe('2026-11-30T09:15:00.000Z');
    // Upright: the sideways 4000×3000 file is 3000×4000 standing, fitted into the display size.
    expect(row.height).toBeGreaterThan(row.width);
    const uploaded = await sharp(
      Buffer.from(
        await (await page.request.get(`/api/assessments/${draftId}/photos/${row.id}?size=original`)).body(),
      ),
    ).metadata();
    expect(Math.max(uploaded.width ?? 0, uploaded.height ?? 0)).toBe(2048);
    expect(uploaded.height).toBeGreaterThan(uploaded.width ?? 0);
  });

  it('refuses a file over the limit that cannot be made smaller, naming the limit, and queues nothing', async () => {
    const card = page.locator('#q-hingeSideGuarded');
    const started = Date.now();
    await card
      .locator('input[data-photo-pick]')
      .setInputFiles(
        { name: 'huge.jpg', mimeType: 'image/jpeg', buffer: Buffer.alloc(16 * 1024 * 1024, 1) },
        { timeout: 60_000 },
      );
    await expect(card.getByRole('alert').textContent()).resolves.toMatch(/16 MB; the limit is 15 MB/);
    console.log(`16 MB file refused after ${Date.now() - started} ms`);
    await expect(card.getByText('waiting').count()).resolves.toBe(0);
  });

  it('offers Retry when the server could not take a photo, and sends it again at once when asked', async () => {
    const sent: number[] = [];
    let lastFailure = 0;
    let serverBack = false;
    await page.route('**/api/assessments/*/photos', async (route) => {
      if (route.request().method() !== 'POST') return route.continue();
      sent.push(Date.now());
      if (serverBack) return route.continue();
      lastFailure = Date.now();
      return route.fulfill({
        status: 500,
        contentType: 'application/problem+json',
        body: JSON.stringify({
          status: 500,
          title: 'Server error',
          detail: 'Something went wrong on the server.',
        }),
      });
    });
    const card = page.locator('#q-latchFitted');
    const photo = await sharp({ create: { width: 800, height: 600, channels: 3, background: '#3b5370' } })
      .jpeg()
      .toBuffer();
    await card
      .locator('input[data-photo-pick]')
      .setInputFiles({ name: 'latch.jpg', mimeType: 'image/jpeg', buffer: photo });
    const stopped = card.locator('[data-upload-failed]');
    await stopped.waitFor({ timeout: 30_000 });
    await expect(stopped.textContent()).resolves.toMatch(
      /Photo not sent yet\. Something went wrong on the server\./,
    );
    // Kept on the phone meanwhile, still shown as waiting.
    await expect(card.getByText('waiting').isVisible()).resolves.toBe(true);
    expect(await seriousAxeViolations(page, ['#q-latchFitted'])).toEqual([]);
    await screenshotBothWidths(page, 'walk-photo-retry', { focus: '#q-latchFitted' });

    // The timed retry (every 10 s) fails too; right after one, the server is back and the auditor taps Retry.
    const tries = sent.length;
    await expect.poll(() => sent.length, { timeout: 20_000 }).toBeGreaterThan(tries);
    await stopped.waitFor();
    serverBack = true;
    await card.getByRole('button', { name: 'Retry now' }).click();
    await card.locator('img[src*="size=thumb"]').waitFor({ timeout: 20_000 });
    // Sent on the tap, well before the next timed retry.
    expect((sent.at(-1) as number) - lastFailure).toBeLessThan(9_000);
    await page.unroute('**/api/assessments/*/photos');
    expect(
      await testDb()('assessment_photos')
        .where({ assessment_id: draftId, item_key: 'latchFitted' })
        .count('* as n')
        .first(),
    ).toEqual({ n: '1' });
  });
});
