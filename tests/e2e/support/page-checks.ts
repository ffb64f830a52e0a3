/**
 * What every page visit in the browser tests checks and keeps: no serious or critical axe-core
 * violation, and a screenshot at phone and desktop width (palette PNG, so the committed files
 * stay small enough to review in a pull request).
 */
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import AxeBuilder from '@axe-core/playwright';
import type { Page } from 'playwright-core';
import sharp from 'sharp';
import { desktopViewport, phoneViewport } from './browser';

export const screenshotsDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../screenshots');

/**
 * Serious and critical violations, one readable line each (rule, impact, first targets).
 * `include` limits the check to the part of the page a step changed (the whole page is
 * checked when it first loads).
 */
export async function seriousAxeViolations(page: Page, include: string[] = []): Promise<string[]> {
  let builder = new AxeBuilder({ page }).withTags([
    'wcag2a',
    'wcag2aa',
    'wcag21a',
    'wcag21aa',
    'best-practice',
  ]);
  for (const selector of include) builder = builder.include(selector);
  const { violations } = await builder.analyze();
  return violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map(
      (v) =>
        `${v.id} (${v.impact}): ${v.help} — ${v.nodes
          .slice(0, 3)
          .map(
            (n) =>
              `${n.target.join(' ')} ${n.html.slice(0, 100)} [${(n.failureSummary ?? '').replace(/\s+/g, ' ').slice(0, 160)}]`,
          )
          .join(' | ')}`,
    );
}

async function savePng(buffer: Buffer, file: string): Promise<void> {
  const small = await sharp(buffer)
    .png({ palette: true, quality: 90, compressionLevel: 9, effort: 8 })
    .toBuffer();
  fs.writeFileSync(file, small);
}

/**
 * Saves `<name>-360.png` and `<name>-1280.png` (the viewport, or the whole page with
 * `fullPage`), then puts the phone viewport back.
 */
export async function screenshotBothWidths(
  page: Page,
  name: string,
  options: { fullPage?: boolean; focus?: string } = {},
): Promise<void> {
  fs.mkdirSync(screenshotsDir, { recursive: true });
  for (const viewport of [phoneViewport, desktopViewport]) {
    await page.setViewportSize(viewport);
    // A new width reflows the page: bring the part being shown back to the top.
    if (options.focus)
      await page
        .locator(options.focus)
        .first()
        .evaluate((el) => el.scrollIntoView({ block: 'start' }));
    await page.evaluate(() => window.scrollTo(0, window.scrollY));
    await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r))));
    const buffer = await page.screenshot({
      fullPage: options.fullPage ?? false,
      animations: 'disabled',
      caret: 'hide',
    });
    await savePng(buffer, path.join(screenshotsDir, `${name}-${viewport.width}.png`));
  }
  await page.setViewportSize(phoneViewport);
}
