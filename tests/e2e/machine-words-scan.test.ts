/**
 * No page of the demo shows a machine string. Seeds the demo scenario, signs in as each of its
 * roles (owner, office, auditor; the homeowner through the e-mailed one-time link) and opens
 * every page reachable from the home page and the menu (breadth first, bounded), plus the
 * detail pages a person opens from lists, and the homeowner's signing page from its e-mail.
 * Fails on any word with `_` between letters (`awaiting_signature`, `barrier_arm`) and on any
 * rule id (`pinch.hinge-side`) or ruleset family slug in the visible text.
 */
import fs from 'node:fs';
import path from 'node:path';
import knex from 'knex';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { demoHomeownerEmail, demoPassword, demoStaff } from '../../db/seeds/demo/people';
import {
  caughtMailIds,
  linkIn,
  requestHomeownerLink,
  signIn,
  waitForMail,
} from '../integration/support/fixtures';
import { launchBrowser, type BrowserSession } from './support/browser';
import { screenshotBothWidths } from './support/page-checks';

/** At most this many pages per person, and at most a few of each route shape. */
const MAX_PAGES = 70;
const PER_SHAPE = 2;

/** Pages a person opens from lists and forms rather than the menu. */
const START_PATHS = [
  '/',
  '/assessments',
  '/archive',
  '/archive/audit',
  '/archive/reinspection',
  '/archive/impact',
  '/rulesets',
  '/clients',
  '/staff',
  '/settings',
  '/mail',
  '/account',
];

/** A word with an underscore between letters: a code, never a word. */
const SNAKE = /[A-Za-z0-9]*[A-Za-z]_[A-Za-z][A-Za-z0-9_]*/g;
/** Rule ids look like "area.words-with-dashes" (src/lib/rules/ruleset-schema.ts). */
const RULE_ID_SHAPE = /\b[a-z]+\.[a-z0-9]+(?:-[a-z0-9]+)+\b/g;

function shipped(): { ruleIds: Set<string>; families: string[] } {
  const dir = path.resolve('rulesets');
  const ruleIds = new Set<string>();
  const families: string[] = [];
  for (const family of fs.readdirSync(dir, { withFileTypes: true }).filter((d) => d.isDirectory())) {
    families.push(family.name);
    for (const file of fs.readdirSync(path.join(dir, family.name))) {
      const text = fs.readFileSync(path.join(dir, family.name, file), 'utf8');
      for (const m of text.matchAll(/"id":\s*"([a-z]+\.[a-z0-9.-]+)"/g)) ruleIds.add(m[1]);
    }
  }
  return { ruleIds, families };
}

const { ruleIds, families } = shipped();

/** The machine strings in a page's visible text, each with a little of what surrounds it. */
export function machineStrings(visible: string): string[] {
  const text = visible.replace(/\S+@\S+/g, ' ').replace(/https?:\/\/\S+/g, ' ');
  const hits: string[] = [];
  const around = (index: number, length: number) =>
    text
      .slice(Math.max(0, index - 30), index + length + 30)
      .replace(/\s+/g, ' ')
      .trim();
  for (const m of text.matchAll(SNAKE)) hits.push(`"${m[0]}" in …${around(m.index!, m[0].length)}…`);
  for (const m of text.matchAll(RULE_ID_SHAPE)) hits.push(`"${m[0]}" in …${around(m.index!, m[0].length)}…`);
  for (const id of ruleIds) {
    const at = text.search(new RegExp(`(^|[^a-z0-9.-])${id.replace(/[.-]/g, '\\$&')}($|[^a-z0-9-])`));
    if (at >= 0) hits.push(`rule id "${id}" in …${around(at, id.length)}…`);
  }
  for (const family of families) {
    const at = text.indexOf(family);
    if (at >= 0) hits.push(`family "${family}" in …${around(at, family.length)}…`);
  }
  return [...new Set(hits)];
}

/** "/assessments/<uuid>/walk" → "/assessments/:id/walk", so lists of many look like one. */
const shapeOf = (pathname: string) =>
  pathname.replace(/[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}/gi, ':id');

/** Links that change something, sign out, or download a file instead of showing a page. */
const skip = (url: URL) =>
  /^\/(api|auth|signin|_astro)\b/.test(url.pathname) ||
  /\.(pdf|csv|ics|zip|json|png|jpe?g|tar)$/i.test(url.pathname) ||
  /\/(file|export|download)\b/.test(url.pathname);

let browser: BrowserSession;
let db: knex.Knex;

async function visibleText(): Promise<string> {
  return browser.page.evaluate(() => document.body.innerText);
}

/** Opens every page reachable from the start paths, breadth first; returns the hits per page. */
async function crawl(who: string): Promise<{ hits: string[]; visited: string[] }> {
  const { page } = browser;
  const origin = new URL(inject('baseUrl')).origin;
  const queue = [...START_PATHS];
  const seen = new Set(queue);
  const perShape = new Map<string, number>();
  const hits: string[] = [];
  const visited: string[] = [];
  while (queue.length && visited.length < MAX_PAGES) {
    const target = queue.shift()!;
    const shape = shapeOf(new URL(target, origin).pathname);
    if ((perShape.get(shape) ?? 0) >= PER_SHAPE) continue;
    perShape.set(shape, (perShape.get(shape) ?? 0) + 1);
    const response = await page.goto(target, { waitUntil: 'load' });
    await page.waitForLoadState('networkidle', { timeout: 5000 }).catch(() => {});
    visited.push(`${target} ${response?.status() ?? '?'}`);
    for (const hit of machineStrings(await visibleText())) hits.push(`${who} ${shape}: ${hit}`);
    const hrefs = await page.$$eval('a[href]', (links) => links.map((a) => (a as HTMLAnchorElement).href));
    for (const href of hrefs) {
      const url = new URL(href, origin);
      if (url.origin !== origin || skip(url)) continue;
      const next = url.pathname + url.search;
      if (seen.has(next)) continue;
      seen.add(next);
      queue.push(next);
    }
  }
  const unique = [...new Set(hits)];
  // The whole list, for whoever fixes the pages (the assertion's diff is cut short).
  fs.mkdirSync('test-results', { recursive: true });
  fs.writeFileSync(`test-results/machine-words-${who}.txt`, [...unique, '', ...visited].join('\n'));
  return { hits: unique, visited };
}

async function signInStaff(email: string): Promise<void> {
  const { page } = browser;
  await page.context().clearCookies();
  await page.goto('/signin');
  await page.locator('#email').fill(email);
  await page.locator('#password').fill(demoPassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/signin'));
}

beforeAll(async () => {
  // The demo scenario, seeded once into the test database (it does nothing when already there).
  db = knex({ client: 'pg', connection: { connectionString: inject('migrationDatabaseUrl') } });
  const { seed } = await import('../../db/seeds/01_demo_scenario');
  await seed(db);
  browser = await launchBrowser(inject('baseUrl'));
}, 600_000);

afterAll(async () => {
  await browser?.close();
  await db?.destroy();
});

describe('no machine strings on the demo pages', () => {
  it('finds the codes it looks for', () => {
    expect(machineStrings('Status: awaiting_signature')).toHaveLength(1);
    expect(machineStrings('Gate kind barrier_arm, see pinch.hinge-side')).toHaveLength(3);
    expect(machineStrings('Awaiting signature, e.g. a barrier arm. Seen 3.5 mm; user@x_y.test')).toEqual([]);
  });

  for (const person of demoStaff.filter((p) => p.email !== 'auditor2@quillmoor.test')) {
    it(`shows the ${person.role} no code on any page`, async () => {
      await signInStaff(person.email);
      const { hits, visited } = await crawl(person.role);
      expect(visited.length).toBeGreaterThan(5);
      expect(hits).toEqual([]);
    }, 600_000);
  }

  it('shows the homeowner no code, signed in by the e-mailed link', async () => {
    const { page } = browser;
    await page.context().clearCookies();
    await page.goto(await requestHomeownerLink(demoHomeownerEmail));
    await page.getByRole('button', { name: /continue/i }).click();
    await page.waitForURL((url) => !url.pathname.startsWith('/signin'));
    const { hits, visited } = await crawl('homeowner');
    expect(visited.length).toBeGreaterThan(1);
    expect(hits).toEqual([]);
  }, 600_000);

  it('shows the signing page from its e-mail without a code', async () => {
    const { page } = browser;
    // The office sends a submitted demo report for signature; the link arrives by e-mail.
    const org = await db('organisations').where({ slug: 'quillmoor' }).first('id');
    const scored = await db('assessments').where({ organisation_id: org.id, status: 'scored' }).first('id');
    expect(scored, 'the demo has a submitted report not yet sent').toBeTruthy();
    const office = await signIn('office@quillmoor.test', demoPassword);
    const seen = await caughtMailIds(demoHomeownerEmail);
    const sent = await office.json('POST', `/api/assessments/${scored.id}/send-for-signature`, {
      expiresInDays: 14,
      recipient: demoHomeownerEmail,
    });
    expect(sent.status, await sent.clone().text()).toBeLessThan(300);
    const mail = await waitForMail(demoHomeownerEmail, seen, 20_000);
    await page.context().clearCookies();
    await page.goto(linkIn(mail.text, '/sign/'));
    await page.waitForLoadState('networkidle', { timeout: 5000 }).catch(() => {});
    const text = await visibleText();
    // The expiry in the organisation's zone (the demo's is America/Denver), to the minute.
    expect(text).toMatch(/works until [A-Z][a-z]{2} \d{1,2}, \d{4}, \d{1,2}:\d{2} [AP]M M[SD]T/);
    expect(mail.text).toMatch(/expires on [A-Z][a-z]{2} \d{1,2}, \d{4}, \d{1,2}:\d{2} [AP]M M[SD]T/);
    expect(machineStrings(text)).toEqual([]);
    await screenshotBothWidths(page, 'words-sign-page', { fullPage: true });
  }, 120_000);
});
