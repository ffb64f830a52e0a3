/**
 * The authorization matrix: every route file under src/pages/api, every method it exports,
 * called as each role of one organisation, as a signed-out visitor and as another
 * organisation's owner, with the status each must get. A route without a row here fails the
 * first test, so a new endpoint cannot ship without saying who may call it.
 *
 * Calls that change or remove something get a fresh target per caller (`t.fresh…`), so the
 * outcome of one call never decides the next one's.
 */
import fs from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import {
  anonymousClient,
  createOrganisation,
  fixturePassword,
  signIn,
  signInHomeowner,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { makePkcs12, type TestPkcs12 } from './support/pkcs12';
import { queueOutboxMessage } from './support/outbox';
import {
  insertClient,
  insertDraft,
  insertGate,
  insertSite,
  publishedFamilies,
  currentVersion,
  seedDirectory,
  type Directory,
} from './support/domain';

type Who = 'owner' | 'office' | 'auditor' | 'homeowner' | 'anonymous' | 'otherOrg';
const callers: readonly Who[] = ['owner', 'office', 'auditor', 'homeowner', 'anonymous', 'otherOrg'];

/** Expected statuses, in the column order of the table below. */
const s = (
  owner: number,
  office: number,
  auditor: number,
  homeowner: number,
  anonymous: number,
  otherOrg: number,
): Record<Who, number> => ({
  owner,
  office,
  auditor,
  homeowner,
  anonymous,
  otherOrg,
});

interface Call {
  path: string;
  body?: unknown;
  headers?: Record<string, string>;
  /** A urlencoded form body (auth core's callbacks). */
  form?: string;
  /** A multipart body (photo uploads). */
  multipart?: FormData;
  /** A raw body with its own content type (force-meter CSV). */
  raw?: { contentType: string; text: string };
}

/** What the subject organisation holds, and fresh rows for calls that change or delete. */
interface Targets {
  org: FixtureOrganisation;
  dir: Directory;
  family: string;
  freshClient(): Promise<string>;
  freshSite(): Promise<string>;
  freshGate(): Promise<string>;
  /** A draft of the first auditor, pinned to the family's current version, ready to submit. */
  freshDraft(): Promise<string>;
  uniqueEmail(prefix: string): string;
  /** A photo uploaded (as the owner) to a fresh draft. */
  freshPhoto(): Promise<{ draftId: string; photoId: string }>;
  /** A force trace uploaded (as the owner) to a fresh draft. */
  freshTrace(): Promise<{ draftId: string; traceId: string }>;
  /** An open staff invitation made by the owner. */
  freshInvitation(): Promise<string>;
  /** The family's current published version id. */
  versionId: string;
  /** A fresh draft submitted by the owner: status scored. */
  freshScored(): Promise<string>;
  /** A fresh assessment recorded as signed (inserted directly; the signing flow has its own tests). */
  freshSigned(): Promise<string>;
  /** A document of an assessment the owner sent for signature (made once). */
  sentDocument(): Promise<string>;
}

interface Row {
  /** The route file under src/pages/api, without extension. */
  route: string;
  method: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';
  call: (t: Targets) => Call | Promise<Call>;
  expect: Record<Who, number>;
}

const row = (
  route: string,
  method: Row['method'],
  call: Row['call'],
  expected: Record<Who, number>,
): Row => ({ route, method, call, expect: expected });

const siteContext = {
  pedestriansUseDriveway: false,
  childrenOrPetsPresent: false,
  publicAccess: false,
  slopeAcrossSwing: false,
};

/** A message of the organisation given up on: failed in the outbox, its job on the dead-letter queue. */
async function deadMessageJob(organisationId: string): Promise<string> {
  const { jobId } = await queueOutboxMessage(
    testDb(),
    {
      organisation_id: organisationId,
      kind: 'test_message',
      to_addresses: [`dead.${Date.now()}@example.test`],
      subject: 'Given up on',
      text_body: 'x',
      status: 'failed',
      attempts: 10,
    },
    { queue: 'mail-dead' },
  );
  return jobId;
}

/** A fresh draft amendment of the family's current version, derived by the subject organisation's owner. */
async function freshAmendment(t: Targets): Promise<{ path: string; ruleId: string }> {
  const from = await currentVersion(t.family);
  const res = await send(clients.owner, 'POST', {
    path: '/api/rulesets/amendments',
    body: { fromFamily: t.family, fromVersion: from.version },
  });
  if (res.status !== 201)
    throw new Error(`deriving an amendment answered ${res.status}: ${await res.text()}`);
  const draft = await res.json();
  return { path: `/api/rulesets/${draft.family}/${draft.version}`, ruleId: draft.content.rules[0].id };
}

/** A PKCS#12 the owner may upload as the signing certificate (made once; each call gets a new form). */
let certificate: TestPkcs12 | undefined;
async function certificateForm(): Promise<FormData> {
  certificate ??= await makePkcs12();
  const form = new FormData();
  form.set(
    'certificate',
    new Blob([new Uint8Array(certificate.p12)], { type: 'application/x-pkcs12' }),
    'signing.p12',
  );
  form.set('passphrase', certificate.passphrase);
  return form;
}

// prettier-ignore
const matrix: Row[] = [
  //   route                          method    request                                                                              owner office auditor home anon other
  row('health',                      'GET',    () => ({ path: '/api/health' }),                                                       s(200, 200, 200, 200, 200, 200)),
  row('auth/[...auth]',              'GET',    () => ({ path: '/api/auth/session' }),                                                 s(200, 200, 200, 200, 200, 200)),
  row('auth/[...auth]',              'POST',   () => ({ path: '/api/auth/callback/credentials', form: 'email=x%40matrix.test&password=x' }), s(403, 403, 403, 403, 403, 403)),
  row('auth/email-link',             'POST',   () => ({ path: '/api/auth/email-link', body: {} }),                                    s(422, 422, 422, 422, 422, 422)),
  row('organisation',                'GET',    () => ({ path: '/api/organisation' }),                                                 s(200, 200, 200, 403, 401, 200)),
  row('organisation',                'PATCH',  () => ({ path: '/api/organisation', body: { remindClients: false } }),                 s(200, 403, 403, 403, 401, 200)),
  row('organisation/certificate',    'GET',    () => ({ path: '/api/organisation/certificate' }),                                     s(200, 200, 403, 403, 401, 200)),
  row('organisation/certificate',    'PUT',    async () => ({ path: '/api/organisation/certificate', multipart: await certificateForm() }), s(200, 403, 403, 403, 401, 200)),
  row('organisation/certificate',    'DELETE', () => ({ path: '/api/organisation/certificate' }),                                     s(204, 403, 403, 403, 401, 204)),
  row('users/index',                 'GET',    () => ({ path: '/api/users' }),                                                        s(200, 200, 403, 403, 401, 200)),
  row('users/[id]',                  'GET',    (t) => ({ path: `/api/users/${t.org.auditor2.id}` }),                                  s(200, 200, 403, 403, 401, 404)),
  row('users/[id]',                  'PATCH',  (t) => ({ path: `/api/users/${t.org.auditor2.id}`, body: { name: 'Second auditor' } }), s(200, 403, 403, 403, 401, 404)),
  row('invitations/index',           'GET',    () => ({ path: '/api/invitations' }),                                                  s(200, 403, 403, 403, 401, 200)),
  row('invitations/index',           'POST',   (t) => ({ path: '/api/invitations', body: { email: t.uniqueEmail('invitee'), role: 'auditor' } }), s(201, 403, 403, 403, 401, 201)),
  row('invitations/[token]/accept',  'POST',   () => ({ path: '/api/invitations/no-such-token/accept', body: { name: 'Nobody', password: 'long-enough-pass' } }), s(404, 404, 404, 404, 404, 404)),
  row('account/password',            'POST',   () => ({ path: '/api/account/password', body: {} }),                                  s(422, 422, 422, 403, 401, 422)),

  row('clients/index',               'GET',    () => ({ path: '/api/clients' }),                                                      s(200, 200, 200, 200, 401, 200)),
  row('clients/index',               'POST',   () => ({ path: '/api/clients', body: { name: 'Matrix Client', kind: 'business' } }),   s(201, 201, 201, 403, 401, 201)),
  row('clients/[id]',                'GET',    (t) => ({ path: `/api/clients/${t.dir.clientId}` }),                                   s(200, 200, 200, 404, 401, 404)),
  row('clients/[id]',                'PATCH',  (t) => ({ path: `/api/clients/${t.dir.clientId}`, body: { notes: 'Checked' } }),       s(200, 200, 200, 403, 401, 404)),
  row('clients/[id]',                'DELETE', async (t) => ({ path: `/api/clients/${await t.freshClient()}` }),                      s(204, 204, 403, 403, 401, 404)),
  row('sites/index',                 'GET',    () => ({ path: '/api/sites' }),                                                        s(200, 200, 200, 200, 401, 200)),
  row('sites/index',                 'POST',   (t) => ({ path: '/api/sites', body: { clientId: t.dir.clientId, addressLine1: '1 Matrix Way', city: 'Eastholm', usageClass: 1 } }), s(201, 201, 201, 403, 401, 422)),
  row('sites/[id]',                  'GET',    (t) => ({ path: `/api/sites/${t.dir.siteId}` }),                                       s(200, 200, 200, 404, 401, 404)),
  row('sites/[id]',                  'PATCH',  (t) => ({ path: `/api/sites/${t.dir.siteId}`, body: { notes: 'Checked' } }),         s(200, 200, 200, 403, 401, 404)),
  row('sites/[id]',                  'DELETE', async (t) => ({ path: `/api/sites/${await t.freshSite()}` }),                          s(204, 204, 403, 403, 401, 404)),
  row('gates/index',                 'GET',    () => ({ path: '/api/gates' }),                                                        s(200, 200, 200, 200, 401, 200)),
  row('gates/index',                 'POST',   (t) => ({ path: '/api/gates', body: { siteId: t.dir.siteId, label: 'Matrix gate', kind: 'slide', leaves: 'single' } }), s(201, 201, 201, 403, 401, 422)),
  row('gates/[id]',                  'GET',    (t) => ({ path: `/api/gates/${t.dir.gateId}` }),                                       s(200, 200, 200, 404, 401, 404)),
  row('gates/[id]',                  'PATCH',  (t) => ({ path: `/api/gates/${t.dir.gateId}`, body: { nextInspectionDue: '2027-06-30' } }), s(200, 200, 200, 403, 401, 404)),
  row('gates/[id]',                  'DELETE', async (t) => ({ path: `/api/gates/${await t.freshGate()}` }),                          s(204, 204, 403, 403, 401, 404)),
  row('gates/[id]/duplicate',        'POST',   (t) => ({ path: `/api/gates/${t.dir.gateId}/duplicate`, body: { label: 'Matrix copy' } }), s(201, 201, 201, 403, 401, 404)),
  row('assessments/index',           'GET',    () => ({ path: '/api/assessments' }),                                                  s(200, 200, 200, 200, 401, 200)),
  row('assessments/index',           'POST',   (t) => ({ path: '/api/assessments', body: { gateId: t.dir.gateId, family: t.family, purpose: 'inspection' } }), s(201, 201, 201, 403, 401, 422)),
  row('assessments/[id]',            'GET',    async (t) => ({ path: `/api/assessments/${await t.freshDraft()}` }),                   s(200, 200, 200, 404, 401, 404)),
  row('assessments/[id]',            'PATCH',  async (t) => ({ path: `/api/assessments/${await t.freshDraft()}`, body: { purpose: 'service' }, headers: { 'if-match': '"1"' } }), s(200, 200, 200, 403, 401, 404)),
  row('assessments/[id]',            'DELETE', async (t) => ({ path: `/api/assessments/${await t.freshDraft()}` }),                   s(204, 204, 204, 403, 401, 404)),
  row('assessments/[id]/submit',     'POST',   async (t) => ({ path: `/api/assessments/${await t.freshDraft()}/submit` }),            s(200, 200, 200, 403, 401, 404)),
  // A draft started empty has nothing carried forward: any key is a 422 for those who may confirm.
  row('assessments/[id]/carried-forward', 'GET', async (t) => ({ path: `/api/assessments/${await t.freshDraft()}/carried-forward` }), s(200, 200, 200, 403, 401, 404)),
  row('assessments/[id]/carried-forward', 'POST', async (t) => ({ path: `/api/assessments/${await t.freshDraft()}/carried-forward`, body: { keys: ['answers.placardsLegible'] } }), s(422, 422, 422, 403, 401, 404)),
  row('assessments/[id]/photos/index', 'GET',  async (t) => ({ path: `/api/assessments/${await t.freshDraft()}/photos` }),            s(200, 200, 200, 404, 401, 404)),
  row('assessments/[id]/photos/index', 'POST', async (t) => ({ path: `/api/assessments/${await t.freshDraft()}/photos`, multipart: await photoForm() }), s(201, 201, 201, 403, 401, 404)),
  row('assessments/[id]/photos/[photoId]', 'GET', async (t) => { const p = await t.freshPhoto(); return { path: `/api/assessments/${p.draftId}/photos/${p.photoId}?size=thumb` }; }, s(200, 200, 200, 404, 401, 404)),
  row('assessments/[id]/photos/[photoId]', 'DELETE', async (t) => { const p = await t.freshPhoto(); return { path: `/api/assessments/${p.draftId}/photos/${p.photoId}` }; }, s(204, 204, 204, 403, 401, 404)),
  row('assessments/[id]/force-traces/index', 'GET', async (t) => ({ path: `/api/assessments/${await t.freshDraft()}/force-traces` }), s(200, 200, 200, 404, 401, 404)),
  row('assessments/[id]/force-traces/index', 'POST', async (t) => ({ path: `/api/assessments/${await t.freshDraft()}/force-traces?${traceQuery}`, raw: { contentType: 'text/csv', text: forceTraceCsv } }), s(201, 201, 201, 403, 401, 404)),
  row('assessments/[id]/force-traces/[traceId]', 'DELETE', async (t) => { const f = await t.freshTrace(); return { path: `/api/assessments/${f.draftId}/force-traces/${f.traceId}` }; }, s(204, 204, 204, 403, 401, 404)),

  row('assessments/[id]/report.pdf',  'GET',   async (t) => ({ path: `/api/assessments/${await t.freshScored()}/report.pdf` }),         s(200, 200, 200, 404, 401, 404)),
  row('assessments/[id]/signing',     'GET',   async (t) => ({ path: `/api/assessments/${await t.freshScored()}/signing` }),            s(200, 200, 200, 403, 401, 404)),
  row('assessments/[id]/send-for-signature', 'POST', async (t) => ({ path: `/api/assessments/${await t.freshScored()}/send-for-signature` }), s(202, 202, 202, 403, 401, 404)),
  row('assessments/[id]/revise',      'POST',  async (t) => ({ path: `/api/assessments/${await t.freshSigned()}/revise` }),             s(201, 201, 201, 403, 401, 404)),
  row('documents/[id]',               'GET',   async (t) => ({ path: `/api/documents/${await t.sentDocument()}` }),                     s(200, 200, 200, 404, 401, 404)),
  row('documents/[id]/file',          'GET',   async (t) => ({ path: `/api/documents/${await t.sentDocument()}/file` }),                s(200, 200, 200, 404, 401, 404)),
  row('sign/[token]/report.pdf',      'GET',   () => ({ path: '/api/sign/not-a-real-token/report.pdf' }),                              s(404, 404, 404, 404, 404, 404)),
  row('sign/[token]/submit',          'POST',  () => ({ path: '/api/sign/not-a-real-token/submit', body: { name: 'Nobody Here', consent: true, intent: true, acknowledgedCautions: [], shownPdfSha256: '0'.repeat(64), signature: { method: 'typed' } } }), s(404, 404, 404, 404, 404, 404)),
  row('invitations/[id]',            'DELETE', async (t) => ({ path: `/api/invitations/${await t.freshInvitation()}` }),              s(204, 403, 403, 403, 401, 404)),
  row('verify/index',                'GET',    () => ({ path: '/api/verify?document=00000000-0000-4000-8000-000000000000' }),         s(200, 200, 200, 200, 200, 200)),
  row('verify/index',                'POST',   () => ({ path: '/api/verify', raw: { contentType: 'application/pdf', text: '%PDF-1.7 not a report' } }), s(200, 200, 200, 200, 200, 200)),
  row('archive/index',               'GET',    () => ({ path: '/api/archive' }),                                                      s(200, 200, 403, 403, 401, 200)),
  row('archive/count',               'GET',    () => ({ path: '/api/archive/count' }),                                                s(200, 200, 403, 403, 401, 200)),
  row('archive/export',              'GET',    () => ({ path: '/api/archive/export' }),                                               s(200, 200, 403, 403, 401, 200)),
  row('archive/audit/index',         'GET',    () => ({ path: '/api/archive/audit' }),                                                s(200, 403, 403, 403, 401, 200)),
  row('archive/audit/verify',        'GET',    () => ({ path: '/api/archive/audit/verify' }),                                         s(200, 403, 403, 403, 401, 200)),
  row('archive/gates/[id]/index',    'GET',    (t) => ({ path: `/api/archive/gates/${t.dir.gateId}` }),                               s(200, 200, 200, 403, 401, 404)),
  row('archive/gates/[id]/reinspection.ics', 'GET', (t) => ({ path: `/api/archive/gates/${t.dir.gateId}/reinspection.ics` }),         s(200, 200, 200, 403, 401, 404)),
  row('archive/impact',              'GET',    (t) => ({ path: `/api/archive/impact?versionId=${t.versionId}` }),                     s(200, 200, 403, 403, 401, 200)),
  row('archive/impact.csv',          'GET',    (t) => ({ path: `/api/archive/impact.csv?versionId=${t.versionId}` }),                 s(200, 200, 403, 403, 401, 200)),
  row('archive/impact/run',          'GET',    (t) => ({ path: `/api/archive/impact/run?versionId=${t.versionId}` }),                 s(200, 200, 403, 403, 401, 200)),
  row('archive/impact/run',          'POST',   (t) => ({ path: '/api/archive/impact/run', body: { versionId: t.versionId } }),         s(202, 202, 403, 403, 401, 202)),
  row('jobs/index',                  'GET',    () => ({ path: '/api/jobs' }),                                                         s(200, 403, 403, 403, 401, 200)),
  row('jobs/[id]/retry',             'POST',   async (t) => ({ path: `/api/jobs/${await deadMessageJob(t.org.id)}/retry` }),          s(202, 403, 403, 403, 401, 404)),
  row('archive/reinspection/index',  'GET',    () => ({ path: '/api/archive/reinspection' }),                                         s(200, 200, 403, 403, 401, 200)),
  row('archive/reinspection/reminders', 'POST', () => ({ path: '/api/archive/reinspection/reminders' }),                               s(202, 202, 403, 403, 401, 202)),

  row('score',                       'POST',   (t) => ({ path: '/api/score', body: { family: t.family, input: { profile: { kind: 'slide', leaves: 'single', usageClass: 1, operatorListed: true, automaticClosing: false }, site: siteContext } } }), s(200, 200, 200, 403, 401, 200)),
  row('rulesets/index',              'GET',    () => ({ path: '/api/rulesets' }),                                                     s(200, 200, 200, 200, 401, 200)),
  row('rulesets/amendments',         'POST',   async (t) => ({ path: '/api/rulesets/amendments', body: { fromFamily: t.family, fromVersion: (await currentVersion(t.family)).version } }), s(201, 403, 403, 403, 401, 201)),
  row('rulesets/[family]/diff',      'GET',    async (t) => { const v = (await currentVersion(t.family)).version; return { path: `/api/rulesets/${t.family}/diff?from=${v}&to=${v}` }; }, s(200, 200, 200, 200, 401, 200)),
  row('rulesets/[family]/[version]', 'GET',    async (t) => ({ path: (await freshAmendment(t)).path }),                               s(200, 200, 200, 404, 401, 404)),
  row('rulesets/[family]/[version]', 'PATCH',  async (t) => { const a = await freshAmendment(t); return { path: a.path, body: { rules: { [a.ruleId]: { severity: 'critical' } } } }; }, s(200, 403, 403, 403, 401, 404)),
  row('rulesets/[family]/[version]', 'DELETE', async (t) => ({ path: (await freshAmendment(t)).path }),                               s(204, 403, 403, 403, 401, 404)),
  row('rulesets/[family]/[version]/publish', 'POST', async (t) => ({ path: `${(await freshAmendment(t)).path}/publish` }),           s(200, 403, 403, 403, 401, 404)),
];

/** An 8 × 8 grey PNG, made on the spot. */
let png: Buffer | undefined;
async function photoForm(): Promise<FormData> {
  png ??= await sharp({ create: { width: 8, height: 8, channels: 3, background: '#8a8a8a' } })
    .png()
    .toBuffer();
  const form = new FormData();
  form.set('photo', new Blob([new Uint8Array(png)], { type: 'image/png' }), 'gate.png');
  form.set('itemKey', 'closingEdge');
  return form;
}

/** Six seconds of a force meter at 500 Hz: a push up to 280 N at 0.4 s, then easing to 20 N. */
const forceTraceCsv = [
  'time (s),force (N)',
  ...Array.from({ length: 3001 }, (_, i) => {
    const t = i / 500;
    const f = t < 0.4 ? 700 * t : Math.max(20, 280 - 400 * (t - 0.4));
    return `${t.toFixed(3)},${f.toFixed(1)}`;
  }),
].join('\n');
const traceQuery = 'itemKey=forceTest&location=closing_edge&direction=closing&gapMm=50';

const apiRoot = path.resolve(__dirname, '../../src/pages/api');

/** Every "route METHOD" the API exports, read from the route files themselves. */
function declaredRoutes(): string[] {
  const found: string[] = [];
  for (const file of fs.readdirSync(apiRoot, { recursive: true, encoding: 'utf8' })) {
    if (!/\.(ts|js|mjs)$/.test(file)) continue;
    const route = file
      .replace(/\.(ts|js|mjs)$/, '')
      .split(path.sep)
      .join('/');
    const source = fs.readFileSync(path.join(apiRoot, file), 'utf8');
    const methods = new Set<string>();
    for (const m of source.matchAll(
      /export\s+(?:const|async\s+function|function)\s+(GET|POST|PUT|PATCH|DELETE|OPTIONS|HEAD|ALL)\b/g,
    ))
      methods.add(m[1] as string);
    for (const m of source.matchAll(/export\s*\{([^}]*)\}/g))
      for (const name of (m[1] as string).matchAll(/\bas\s+(GET|POST|PUT|PATCH|DELETE|OPTIONS|HEAD|ALL)\b/g))
        methods.add(name[1] as string);
    for (const method of methods) found.push(`${route} ${method}`);
  }
  return found.sort();
}

let clients: Record<Who, TestClient>;
let targets: Targets;
let sentDocument: Promise<string> | undefined;

async function send(client: TestClient, method: string, call: Call): Promise<Response> {
  if (call.multipart)
    return client.fetch(call.path, {
      method,
      headers: { accept: 'application/json', ...call.headers },
      body: call.multipart,
    });
  if (call.raw)
    return client.fetch(call.path, {
      method,
      headers: { accept: 'application/json', 'content-type': call.raw.contentType, ...call.headers },
      body: call.raw.text,
    });
  if (call.form !== undefined) {
    return client.fetch(call.path, {
      method,
      headers: {
        'content-type': 'application/x-www-form-urlencoded',
        accept: 'application/json',
        ...call.headers,
      },
      body: call.form,
    });
  }
  const headers: Record<string, string> = { accept: 'application/json', ...call.headers };
  if (call.body !== undefined) headers['content-type'] = 'application/json';
  return client.fetch(call.path, {
    method,
    headers,
    body: call.body === undefined ? undefined : JSON.stringify(call.body),
  });
}

beforeAll(async () => {
  const [org, other] = await Promise.all([createOrganisation('matrix'), createOrganisation('matrix-other')]);
  const dir = await seedDirectory(org);
  const [family] = await publishedFamilies();
  if (!family) throw new Error('no ruleset family is published in the test database');
  const version = await currentVersion(family);
  let emails = 0;
  targets = {
    org,
    dir,
    family,
    freshClient: () => insertClient(org.id),
    freshSite: () => insertSite(org.id, dir.clientId),
    freshGate: () => insertGate(org.id, dir.siteId),
    freshDraft: () =>
      insertDraft(org.id, dir.gateId, org.auditor.id, version.id, {
        observations: JSON.stringify({ site: siteContext }),
      }),
    uniqueEmail: (prefix) => `${prefix}.${Date.now()}.${emails++}@matrix.test`,
    versionId: version.id,
    async freshScored() {
      const id = await targets.freshDraft();
      const res = await send(clients.owner, 'POST', { path: `/api/assessments/${id}/submit` });
      if (res.status !== 200) throw new Error(`submitting answered ${res.status}: ${await res.text()}`);
      return id;
    },
    freshSigned: () =>
      insertDraft(org.id, dir.gateId, org.auditor.id, version.id, {
        status: 'signed',
        verdict: 'clear',
        result: JSON.stringify({ verdict: 'clear' }),
        result_sha256: 'a'.repeat(64),
        submitted_at: testDb().fn.now(),
        signed_at: testDb().fn.now(),
      }),
    sentDocument() {
      sentDocument ??= (async () => {
        const id = await targets.freshScored();
        const sent = await send(clients.owner, 'POST', { path: `/api/assessments/${id}/send-for-signature` });
        if (sent.status !== 202) throw new Error(`sending answered ${sent.status}: ${await sent.text()}`);
        const signing = await (
          await send(clients.owner, 'GET', { path: `/api/assessments/${id}/signing` })
        ).json();
        const documentId = signing.documents?.[0]?.id;
        if (!documentId) throw new Error(`no document after sending: ${JSON.stringify(signing)}`);
        return documentId as string;
      })();
      return sentDocument;
    },
    async freshInvitation() {
      const res = await send(clients.owner, 'POST', {
        path: '/api/invitations',
        body: { email: targets.uniqueEmail('withdrawn'), role: 'office' },
      });
      if (res.status !== 201) throw new Error(`inviting answered ${res.status}: ${await res.text()}`);
      return (await res.json()).id;
    },
    async freshPhoto() {
      const draftId = await targets.freshDraft();
      const res = await send(clients.owner, 'POST', {
        path: `/api/assessments/${draftId}/photos`,
        multipart: await photoForm(),
      });
      if (res.status !== 201) throw new Error(`photo upload answered ${res.status}: ${await res.text()}`);
      return { draftId, photoId: (await res.json()).id };
    },
    async freshTrace() {
      const draftId = await targets.freshDraft();
      const res = await send(clients.owner, 'POST', {
        path: `/api/assessments/${draftId}/force-traces?${traceQuery}`,
        raw: { contentType: 'text/csv', text: forceTraceCsv },
      });
      if (res.status !== 201) throw new Error(`trace upload answered ${res.status}: ${await res.text()}`);
      return { draftId, traceId: (await res.json()).id };
    },
  };
  const [owner, office, auditor, homeowner, otherOrg] = await Promise.all([
    signIn(org.owner.email, fixturePassword),
    signIn(org.office.email, fixturePassword),
    signIn(org.auditor.email, fixturePassword),
    signInHomeowner(org.homeowner.email),
    signIn(other.owner.email, fixturePassword),
  ]);
  clients = { owner, office, auditor, homeowner, anonymous: anonymousClient(), otherOrg };
});

describe('authorization matrix', () => {
  it('has a row for every route and method under src/pages/api, and none for routes that are gone', () => {
    const declared = declaredRoutes();
    const covered = matrix.map((r) => `${r.route} ${r.method}`);
    expect(
      declared.filter((k) => !covered.includes(k)),
      'routes without a matrix row',
    ).toEqual([]);
    expect(
      covered.filter((k) => !declared.includes(k)),
      'matrix rows for routes that do not exist',
    ).toEqual([]);
    expect(new Set(covered).size, 'each route and method once').toBe(covered.length);
  });

  it.each(matrix.map((r) => [`${r.method} ${r.route}`, r] as const))(
    '%s answers each caller as the table says',
    async (_name, r) => {
      const actual = {} as Record<Who, number>;
      for (const who of callers) {
        const res = await send(clients[who], r.method, await r.call(targets));
        actual[who] = res.status;
        const text = await res.text();
        if (res.status >= 400)
          expect(text, `${who}: an error never carries a stack trace`).not.toMatch(/\bat .+:\d+:\d+/);
      }
      expect(actual).toEqual(r.expect);
    },
  );

  it("lists never show another organisation's rows", async () => {
    for (const list of [
      '/api/clients?pageSize=100',
      '/api/sites?pageSize=100',
      '/api/gates?pageSize=100',
      '/api/assessments?pageSize=100',
    ]) {
      const body = await (await send(clients.otherOrg, 'GET', { path: list })).text();
      for (const id of Object.values(targets.dir)) expect(body, list).not.toContain(id);
    }
  });
});

describe('path variants of protected routes', () => {
  const spellings = (p: string) => [
    p.replace('/api/', '/%61pi/'),
    p.replace('/api/', '/%2561pi/'),
    `${p}/`,
    p.replace('/api/', '/api//'),
    p.replace('/api/', '/API/'),
    p.replace('/api/', '/api/./'),
  ];

  it('refuses a signed-out visitor however the path is spelled', async () => {
    for (const variant of [
      ...spellings('/api/clients'),
      ...spellings(`/api/gates/${targets.dir.gateId}`),
      ...spellings('/api/users'),
    ]) {
      const res = await send(clients.anonymous, 'GET', { path: variant });
      expect(res.status, variant).toBe(401);
    }
  });

  it("never shows another organisation's or client's record through a variant path", async () => {
    for (const variant of spellings(`/api/clients/${targets.dir.clientId}`)) {
      for (const who of ['otherOrg', 'homeowner'] as const) {
        const res = await send(clients[who], 'GET', { path: variant });
        expect([404], `${who} ${variant}`).toContain(res.status);
      }
    }
  });

  it('gives a signed-in owner the canonical answer or a plain 404 through a variant, nothing else', async () => {
    const path = `/api/clients/${targets.dir.clientId}`;
    const canonical = await (await send(clients.owner, 'GET', { path })).json();
    for (const variant of spellings(path)) {
      const res = await send(clients.owner, 'GET', { path: variant });
      expect([200, 404], variant).toContain(res.status);
      if (res.status === 200) expect(await res.json(), variant).toEqual(canonical);
    }
  });

  it('refuses a state change from a signed-out visitor through a variant path, leaving the row as it was', async () => {
    for (const variant of spellings(`/api/clients/${targets.dir.clientId}`)) {
      const res = await send(clients.anonymous, 'DELETE', { path: variant });
      expect(res.status, variant).toBe(401);
    }
    expect((await send(clients.owner, 'GET', { path: `/api/clients/${targets.dir.clientId}` })).status).toBe(
      200,
    );
  });
});
