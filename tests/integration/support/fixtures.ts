/**
 * Test fixtures for the integration suite: a fresh organisation with one person per role,
 * and signed-in HTTP clients that talk to the built server exactly as a browser would
 * (auth core's CSRF double-submit, the credentials callback, the session cookie, and a
 * same-origin Origin header on every request).
 *
 * Each test file creates its own organisation, so files can run in parallel without
 * seeing each other's rows.
 */
import { randomBytes } from 'node:crypto';
import { inject } from 'vitest';
import knex, { type Knex } from 'knex';
import { hashPassword } from '../../../src/lib/server/passwords';
import type { Role } from '../../../src/lib/server/session-user';

/** Every staff person a fixture creates signs in with this password. */
export const fixturePassword = 'fixture-gate-pass-2026';

export interface FixturePerson {
  id: string;
  email: string;
  name: string;
  role: Role;
  /** `fixturePassword` for staff; null for the homeowner (link sign-in only). */
  password: string | null;
}

export interface FixtureOrganisation {
  id: string;
  slug: string;
  name: string;
  owner: FixturePerson;
  office: FixturePerson;
  auditor: FixturePerson;
  /** A second auditor, for "someone else's draft" cases. */
  auditor2: FixturePerson;
  homeowner: FixturePerson & { clientId: string };
  /** The homeowner's client (kind homeowner), with no sites yet. */
  clientId: string;
}

let connection: Knex | undefined;

/** A Knex connection to the test database (the one the server under test uses). */
export function testDb(): Knex {
  connection ??= knex({ client: 'pg', connection: inject('databaseUrl'), pool: { min: 0, max: 4 } });
  return connection;
}

let ownerConnection: Knex | undefined;

/**
 * The test database as the owner (migration) role, which owns the tables and so can switch a
 * trigger off. Only for tests that tamper with stored rows on purpose (an attacker with more
 * than the app's powers, or corruption); everything else goes through `testDb()`, the app role.
 */
export function ownerTestDb(): Knex {
  ownerConnection ??= knex({
    client: 'pg',
    connection: inject('migrationDatabaseUrl'),
    pool: { min: 0, max: 2 },
  });
  return ownerConnection;
}

/** Closes the fixture connections; call from `afterAll` if a file opens many. Optional. */
export async function closeTestDb(): Promise<void> {
  await connection?.destroy();
  await ownerConnection?.destroy();
  connection = undefined;
  ownerConnection = undefined;
}

let passwordHash: Promise<string> | undefined;

/**
 * Inserts a fresh organisation with an owner, an office person, two auditors and a homeowner
 * (with the client they belong to). `label` goes into the names and e-mails to help reading
 * failures; a random suffix keeps every call unique.
 */
export async function createOrganisation(label = 'org'): Promise<FixtureOrganisation> {
  const tag = `${label
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .slice(0, 24)}-${randomBytes(4).toString('hex')}`;
  passwordHash ??= hashPassword(fixturePassword);
  const hash = await passwordHash;
  return testDb().transaction(async (trx) => {
    const [org] = await trx('organisations')
      .insert({ name: `Fixture Gates ${tag}`, slug: tag, display_units: 'metric', time_zone: 'UTC' })
      .returning(['id', 'slug', 'name']);
    const [client] = await trx('clients')
      .insert({
        organisation_id: org.id,
        name: `Household ${tag}`,
        kind: 'homeowner',
        contact_email: `home.${tag}@fixtures.test`,
      })
      .returning('id');
    const staff: { key: 'owner' | 'office' | 'auditor' | 'auditor2'; role: Role; name: string }[] = [
      { key: 'owner', role: 'owner', name: `Owner ${tag}` },
      { key: 'office', role: 'office', name: `Office ${tag}` },
      { key: 'auditor', role: 'auditor', name: `Auditor ${tag}` },
      { key: 'auditor2', role: 'auditor', name: `Second auditor ${tag}` },
    ];
    const rows = await trx('users')
      .insert(
        staff.map((s) => ({
          organisation_id: org.id,
          email: `${s.key}.${tag}@fixtures.test`,
          name: s.name,
          role: s.role,
          password_hash: hash,
        })),
      )
      .returning(['id', 'email', 'name', 'role']);
    const person = (key: string): FixturePerson => {
      const row = rows.find((r) => r.email.startsWith(`${key}.`));
      return { id: row.id, email: row.email, name: row.name, role: row.role, password: fixturePassword };
    };
    const [home] = await trx('users')
      .insert({
        organisation_id: org.id,
        email: `home.${tag}@fixtures.test`,
        name: `Homeowner ${tag}`,
        role: 'homeowner',
        client_id: client.id,
      })
      .returning(['id', 'email', 'name', 'role']);
    return {
      id: org.id,
      slug: org.slug,
      name: org.name,
      owner: person('owner'),
      office: person('office'),
      auditor: person('auditor'),
      auditor2: person('auditor2'),
      homeowner: {
        id: home.id,
        email: home.email,
        name: home.name,
        role: 'homeowner',
        password: null,
        clientId: client.id,
      },
      clientId: client.id,
    };
  });
}

/** A browser-like HTTP client with its own cookie jar and its own client address. */
export interface TestClient {
  /** The current `Cookie` header value (empty when signed out). */
  readonly cookie: string;
  /**
   * The address this client appears to come from (sent as X-Forwarded-For, which the test
   * server takes as the client address because it runs with TRUST_PROXY=1), so per-address
   * throttling in one test never spills into another. A made-up address from 198.18.0.0/15 (reserved for testing) unless given.
   */
  readonly address: string;
  /**
   * fetch against the server under test: `path` is relative to the base URL. Sends the
   * cookies and `Origin: <baseUrl>`, does not follow redirects, and keeps any cookies the
   * response sets (so a sign-out clears the session).
   */
  fetch(path: string, init?: RequestInit): Promise<Response>;
  /** Shorthand for a JSON request: sets content-type and accept, stringifies `body`. */
  json(method: string, path: string, body?: unknown): Promise<Response>;
}

/** A made-up client address from 198.18.0.0/15, the block reserved for network tests. */
export function testAddress(): string {
  return `198.${18 + Math.floor(Math.random() * 2)}.${Math.floor(Math.random() * 256)}.${1 + Math.floor(Math.random() * 254)}`;
}

/** A client with no session (still sends a same-origin Origin header). */
export function anonymousClient(options: { address?: string } = {}): TestClient {
  const baseUrl = inject('baseUrl');
  const jar = new Map<string, string>();
  const address = options.address ?? testAddress();
  const client: TestClient = {
    address,
    get cookie() {
      return [...jar].map(([k, v]) => `${k}=${v}`).join('; ');
    },
    async fetch(path, init = {}) {
      const headers = new Headers(init.headers);
      if (!headers.has('origin')) headers.set('origin', baseUrl);
      if (!headers.has('x-forwarded-for')) headers.set('x-forwarded-for', address);
      if (jar.size && !headers.has('cookie')) headers.set('cookie', client.cookie);
      const res = await fetch(new URL(path, baseUrl), { redirect: 'manual', ...init, headers });
      keepCookies(jar, res);
      return res;
    },
    json(method, path, body) {
      const headers: Record<string, string> = { accept: 'application/json' };
      if (body !== undefined) headers['content-type'] = 'application/json';
      return client.fetch(path, {
        method,
        headers,
        body: body === undefined ? undefined : JSON.stringify(body),
      });
    },
  };
  return client;
}

function keepCookies(jar: Map<string, string>, res: Response) {
  for (const line of res.headers.getSetCookie()) {
    const [pair, ...attributes] = line.split(';');
    const eq = pair.indexOf('=');
    const name = pair.slice(0, eq).trim();
    const value = pair.slice(eq + 1).trim();
    const expired = attributes.some((a) => {
      const [k, v = ''] = a.split('=').map((s) => s.trim());
      return (
        (k.toLowerCase() === 'max-age' && Number(v) <= 0) ||
        (k.toLowerCase() === 'expires' && Date.parse(v) < Date.now())
      );
    });
    if (expired || value === '') jar.delete(name);
    else jar.set(name, value);
  }
}

/** True when the client holds an auth core session cookie. */
export function hasSession(client: TestClient): boolean {
  return /(^|; )(__Secure-)?authjs\.session-token(\.\d+)?=/.test(client.cookie);
}

async function csrfToken(client: TestClient): Promise<string> {
  const res = await client.fetch('/api/auth/csrf', { headers: { accept: 'application/json' } });
  if (!res.ok) throw new Error(`GET /api/auth/csrf answered ${res.status}`);
  return ((await res.json()) as { csrfToken: string }).csrfToken;
}

/**
 * Posts a form to an auth core credentials callback (after fetching a CSRF token) and returns
 * the raw response: a redirect on success; on refusal problem+json (401, 429) unless
 * `headers` asks for text/html, when it is a redirect back to /signin with the reason.
 */
export async function postCredentials(
  client: TestClient,
  providerId: string,
  fields: Record<string, string>,
  headers: Record<string, string> = {},
): Promise<Response> {
  const form = new URLSearchParams({ ...fields, csrfToken: await csrfToken(client) });
  return client.fetch(`/api/auth/callback/${providerId}`, {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded', ...headers },
    body: form,
  });
}

/**
 * Signs a staff member in over real HTTP (CSRF token, then the credentials callback) and
 * returns a client carrying the session cookie. Throws when no session was issued, with
 * where the server redirected to (e.g. `/signin?error=CredentialsSignin&code=throttled`).
 */
export async function signIn(email: string, password: string): Promise<TestClient> {
  const client = anonymousClient();
  const res = await postCredentials(client, 'credentials', { email, password, callbackUrl: '/' });
  if (!hasSession(client))
    throw new Error(`sign-in of ${email} failed: ${res.status} ${res.headers.get('location') ?? ''}`);
  return client;
}

interface CaughtSummary {
  id: string;
  to: string[];
  subject: string;
  receivedAt: string;
}

/** Ids of the caught messages to `to` so far: pass them to `waitForMail` to wait for a new one. */
export async function caughtMailIds(to: string): Promise<Set<string>> {
  const list = (await (await fetch(`${inject('catcherUrl')}/messages`)).json()) as CaughtSummary[];
  return new Set(list.filter((m) => m.to.some((t) => t.toLowerCase() === to.toLowerCase())).map((m) => m.id));
}

/**
 * Waits for a caught message to `to` that is not among `seen` (from `caughtMailIds`, taken
 * before the action that sends it) and returns its subject, text and html. Polls the catcher
 * for up to `timeoutMs`.
 */
export async function waitForMail(
  to: string,
  seen: Set<string>,
  timeoutMs = 8000,
): Promise<{ subject: string; text: string; html: string | null }> {
  const catcherUrl = inject('catcherUrl');
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const list = (await (await fetch(`${catcherUrl}/messages`)).json()) as CaughtSummary[];
    const fresh = list
      .filter((m) => m.to.some((t) => t.toLowerCase() === to.toLowerCase()) && !seen.has(m.id))
      .sort((a, b) => Date.parse(b.receivedAt) - Date.parse(a.receivedAt));
    if (fresh.length) {
      const message = await (await fetch(`${catcherUrl}/messages/${fresh[0].id}`)).json();
      return { subject: message.subject, text: message.text, html: message.html };
    }
    if (Date.now() > deadline) throw new Error(`no mail to ${to} arrived within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** Finds the first absolute URL in a message body whose path starts with `pathPrefix`. */
export function linkIn(text: string, pathPrefix: string): string {
  const url = [...text.matchAll(/https?:\/\/[^\s"'<>]+/g)]
    .map((m) => m[0])
    .find((u) => new URL(u).pathname.startsWith(pathPrefix));
  if (!url) throw new Error(`no ${pathPrefix} link in:\n${text}`);
  return url;
}

/** Asks for a homeowner sign-in link and returns the link from the caught e-mail. */
export async function requestHomeownerLink(email: string): Promise<string> {
  const seen = await caughtMailIds(email);
  const res = await anonymousClient().json('POST', '/api/auth/email-link', { email });
  if (res.status !== 202)
    throw new Error(`requesting a link for ${email} answered ${res.status}: ${await res.text()}`);
  const mail = await waitForMail(email, seen);
  return linkIn(mail.text, '/signin/link');
}

/**
 * Follows an e-mailed sign-in link as a browser would: opens the page (which only shows a
 * "Continue" button, so mail scanners that prefetch links cannot use it up), then posts the
 * token through auth core. Returns the client and the callback response.
 */
export async function followHomeownerLink(link: string): Promise<{ client: TestClient; response: Response }> {
  const client = anonymousClient();
  const url = new URL(link);
  const page = await client.fetch(url.pathname + url.search);
  if (page.status !== 200) throw new Error(`the sign-in link page answered ${page.status}`);
  const token = url.searchParams.get('token') ?? '';
  const response = await postCredentials(client, 'email-link', { token, callbackUrl: '/' });
  return { client, response };
}

/** Signs a homeowner in through the e-mailed one-time link, read from the mail catcher. */
export async function signInHomeowner(email: string): Promise<TestClient> {
  const { client, response } = await followHomeownerLink(await requestHomeownerLink(email));
  if (!hasSession(client))
    throw new Error(
      `link sign-in of ${email} failed: ${response.status} ${response.headers.get('location') ?? ''}`,
    );
  return client;
}

/** Signs in every person of a fixture organisation (homeowner through the mail link). */
export async function signInAll(
  org: FixtureOrganisation,
): Promise<Record<'owner' | 'office' | 'auditor' | 'auditor2' | 'homeowner', TestClient>> {
  const [owner, office, auditor, auditor2, homeowner] = await Promise.all([
    signIn(org.owner.email, fixturePassword),
    signIn(org.office.email, fixturePassword),
    signIn(org.auditor.email, fixturePassword),
    signIn(org.auditor2.email, fixturePassword),
    signInHomeowner(org.homeowner.email),
  ]);
  return { owner, office, auditor, auditor2, homeowner };
}

/**
 * Changes the organisation's display units or time zone the way its owner does, through the
 * settings form, so the server sees the change at once (a write straight into the database, as
 * another instance would make it, reaches a warm session only after SESSION_RECHECK_MS).
 */
export async function saveOrganisationSettings(
  owner: TestClient,
  organisationId: string,
  changes: { displayUnits?: 'metric' | 'imperial'; timeZone?: string },
): Promise<void> {
  const row = await testDb()('organisations')
    .where({ id: organisationId })
    .first('name', 'display_units', 'time_zone', 'reinspection_months', 'remind_clients');
  const res = await owner.fetch('/settings', {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded' },
    body: new URLSearchParams({
      name: row.name,
      displayUnits: changes.displayUnits ?? row.display_units,
      timeZone: changes.timeZone ?? row.time_zone,
      reinspectionMonths: String(row.reinspection_months),
      ...(row.remind_clients ? { remindClients: 'on' } : {}),
    }),
  });
  if (res.status !== 303) throw new Error(`the settings were not saved: ${res.status} ${await res.text()}`);
}
