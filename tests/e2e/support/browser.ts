/**
 * Debian's chromium driven through playwright-core, the way CI runs it: headless, no sandbox
 * (containers), no background traffic, and a fresh profile folder per launch so no cookie,
 * IndexedDB or cache survives from an earlier run.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

/** Where `apt-get install chromium` puts the browser; CHROMIUM_PATH overrides it. */
export const chromiumPath = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';

export const chromiumArgs = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--no-first-run',
  '--disable-sync',
  '--disable-quic',
];

/** The phone the walk-through is designed for first. */
export const phoneViewport = { width: 360, height: 780 } as const;
export const desktopViewport = { width: 1280, height: 860 } as const;

export interface BrowserSession {
  context: BrowserContext;
  page: Page;
  /** Closes the browser and removes its profile folder. */
  close(): Promise<void>;
}

export async function launchBrowser(baseURL: string): Promise<BrowserSession> {
  if (!fs.existsSync(chromiumPath)) {
    throw new Error(
      `chromium not found at ${chromiumPath}: apt-get install -y chromium (or set CHROMIUM_PATH)`,
    );
  }
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: chromiumPath,
    headless: true,
    args: chromiumArgs,
    baseURL,
    viewport: phoneViewport,
    deviceScaleFactor: 1,
    hasTouch: true,
    isMobile: false,
    locale: 'en-US',
    timezoneId: 'UTC',
    reducedMotion: 'reduce',
  });
  context.setDefaultTimeout(15_000);
  const page = context.pages()[0] ?? (await context.newPage());
  return {
    context,
    page,
    async close() {
      await context.close().catch(() => {});
      fs.rmSync(profile, { recursive: true, force: true });
    },
  };
}
