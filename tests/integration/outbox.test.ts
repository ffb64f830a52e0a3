/**
 * The mail outbox while SMTP is down and after it returns. A second server instance runs on a
 * database and data folder of its own (so the suite's main server, whose worker would happily
 * send through its own catcher, never sees these messages), with its SMTP_URL pointing at a
 * port where this test starts and stops a mail catcher.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import knex, { type Knex } from 'knex';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { freePort, projectRoot, startAppServer, type RunningServer } from '../../src/cli/services';
import { startMailCatcher, type RunningCatcher } from '../../src/lib/server/mail/catcher';
import {
  seedOrganisation,
  seedScoredAssessment,
  type MinimalOrganisation,
  type SeededAssessment,
} from './support/signing-seed';
import { queueOutboxMessage } from './support/outbox';

let adminUrl: string;
let databaseUrl: string;
let databaseName: string;
let dataDir: string;
let db: Knex;
let server: RunningServer;
let smtpPort: number;
let httpPort: number;
let catcher: RunningCatcher | undefined;
let org: MinimalOrganisation;

beforeAll(async () => {
  adminUrl = inject('adminDatabaseUrl');
  databaseName = `latchwell_outbox_${randomBytes(4).toString('hex')}`;
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  const appUser = new URL(inject('migrationDatabaseUrl')).username;
  await admin.query(`create database "${databaseName}" owner "${decodeURIComponent(appUser)}"`);
  await admin.end();
  const url = new URL(inject('migrationDatabaseUrl'));
  url.pathname = `/${databaseName}`;
  databaseUrl = url.toString();
  // Knex loads the .ts migrations with Node's own import(), which a vitest worker cannot serve: migrate in a tsx child.
  const migrated = spawnSync(
    process.execPath,
    [
      '--import',
      'tsx',
      '-e',
      `import('./src/cli/migrate.ts').then((m) => m.migrateLatest(${JSON.stringify(databaseUrl)}))`,
    ],
    {
      cwd: projectRoot,
      encoding: 'utf8',
    },
  );
  if (migrated.status !== 0) throw new Error(`migrating the outbox test database failed: ${migrated.stderr}`);
  db = knex({ client: 'pg', connection: databaseUrl, pool: { min: 0, max: 3 } });
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-outbox-'));
  [smtpPort, httpPort] = await Promise.all([freePort(), freePort()]);
  server = await startAppServer({
    port: await freePort(),
    quiet: true,
    env: {
      DATABASE_URL: databaseUrl,
      // Nothing listens here until the test starts a catcher.
      SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
      MAIL_CATCHER_URL: `http://127.0.0.1:${httpPort}`,
      AUTH_SECRET: 'integration-test-secret-0123456789abcdef',
      AUTH_TRUST_HOST: 'true',
      LATCHWELL_DATA_DIR: dataDir,
      LATCHWELL_ENV: 'test',
      OUTBOX_POLL_MS: '200',
      OUTBOX_RETRY_BASE_MS: '300',
      OUTBOX_RETRY_MAX_MS: '1000',
    },
  });
  org = await seedOrganisation(db, 'outbox');
}, 120_000);

afterAll(async () => {
  await server?.stop();
  await catcher?.close();
  await db?.destroy();
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  await admin.query(`drop database if exists "${databaseName}" with (force)`);
  await admin.end();
  if (dataDir) fs.rmSync(dataDir, { recursive: true, force: true });
});

/** Signs in against the second server exactly as a browser would (CSRF cookie, credentials callback). */
async function signInAt(
  baseUrl: string,
  email: string,
  password: string,
): Promise<(p: string, init?: RequestInit) => Promise<Response>> {
  const jar = new Map<string, string>();
  const send = async (p: string, init: RequestInit = {}) => {
    const headers = new Headers(init.headers);
    headers.set('origin', baseUrl);
    if (jar.size) headers.set('cookie', [...jar].map(([k, v]) => `${k}=${v}`).join('; '));
    const res = await fetch(new URL(p, baseUrl), { redirect: 'manual', ...init, headers });
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(';');
      const eq = pair.indexOf('=');
      jar.set(pair.slice(0, eq).trim(), pair.slice(eq + 1).trim());
    }
    return res;
  };
  const { csrfToken } = (await (
    await send('/api/auth/csrf', { headers: { accept: 'application/json' } })
  ).json()) as { csrfToken: string };
  await send('/api/auth/callback/credentials', {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded' },
    body: new URLSearchParams({ email, password, csrfToken, callbackUrl: '/' }),
  });
  if (![...jar.keys()].some((k) => k.includes('session-token')))
    throw new Error(`could not sign ${email} in on the second server`);
  return send;
}

async function messages(assessmentId: string) {
  return db('outbox_messages')
    .where({ related_type: 'assessment', related_id: assessmentId })
    .orderBy('created_at')
    .select('id', 'kind', 'status', 'attempts', 'last_error', 'next_attempt_at', 'to_addresses');
}

async function until<T>(
  what: string,
  probe: () => Promise<T | undefined | false>,
  timeoutMs = 20_000,
): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

describe('the outbox while SMTP is down', () => {
  let assessment: SeededAssessment;
  let send: Awaited<ReturnType<typeof signInAt>>;

  it('keeps the message queued, retrying with back-off, and the API shows it as queued', async () => {
    assessment = await seedScoredAssessment(
      db,
      { id: org.id, auditorId: org.auditor.id, clientId: org.clientId },
      { dataDir, photos: 0, findings: 6 },
    );
    send = await signInAt(server.url, org.office.email, org.password);
    const res = await send(`/api/assessments/${assessment.assessmentId}/send-for-signature`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: '{}',
    });
    expect(res.status, await res.clone().text()).toBe(202);
    expect((await res.json()).message.status).toBe('queued');

    // Two failed attempts at least: the worker is running and backing off, not giving up.
    const retried = await until('two failed attempts', async () => {
      const [m] = await messages(assessment.assessmentId);
      return m && m.attempts >= 2 ? m : undefined;
    });
    // Between attempts the row is queued; during one it is leased (sending). Either way it waits.
    expect(['queued', 'sending']).toContain(retried.status);
    expect(retried.last_error).toMatch(/ECONNREFUSED|connect/i);
    expect(new Date(retried.next_attempt_at).getTime()).toBeGreaterThan(Date.now() - 1000);
    const status = await (await send(`/api/assessments/${assessment.assessmentId}/signing`)).json();
    expect(status.messages).toHaveLength(1);
    expect(['queued', 'sending']).toContain(status.messages[0].status);
    expect(status.messages[0].attempts).toBeGreaterThanOrEqual(2);
    expect(status.messages[0].lastError).toBeTruthy();
    const page = await (await send(`/assessments/${assessment.assessmentId}/report`)).text();
    expect(page).toContain('Queued: waiting for the mail server');
  });

  it('delivers the queued message once SMTP comes back, and nothing is lost or sent twice', async () => {
    catcher = await startMailCatcher({ dir: path.join(dataDir, 'mail'), smtpPort, httpPort });
    const caught = await until('the mail to arrive', async () => {
      const list = (await (await fetch(`http://127.0.0.1:${httpPort}/messages`)).json()) as Array<{
        id: string;
        to: string[];
        subject: string;
      }>;
      return list.length ? list : undefined;
    });
    expect(caught).toHaveLength(1);
    expect(caught[0].to).toEqual([org.clientEmail]);
    expect(caught[0].subject).toMatch(/Please read and sign/);
    const [m] = await until('the row to be marked sent', async () => {
      const rows = await messages(assessment.assessmentId);
      return rows[0]?.status === 'sent' ? rows : undefined;
    });
    expect(m.attempts).toBeGreaterThanOrEqual(3);
    const status = await (await send(`/api/assessments/${assessment.assessmentId}/signing`)).json();
    expect(status.messages[0].status).toBe('sent');
    expect(status.messages[0].sentAt).toBeTruthy();
    expect(await (await send(`/assessments/${assessment.assessmentId}/report`)).text()).toContain(
      'data-message-status="sent"',
    );
    // Still one message after a few more polls.
    await new Promise((r) => setTimeout(r, 800));
    expect(((await (await fetch(`http://127.0.0.1:${httpPort}/messages`)).json()) as unknown[]).length).toBe(
      1,
    );
  });

  it('marks a message failed after the last attempt and keeps it for the record', async () => {
    const { id } = await queueOutboxMessage(db, {
      organisation_id: org.id,
      kind: 'test',
      to_addresses: ['nobody@fixtures.test'],
      subject: 'Bound to fail',
      text_body: 'x',
      attempts: 9,
      attachments: [{ filename: 'gone.pdf', contentType: 'application/pdf', storageKey: 'f'.repeat(64) }],
    });
    // The attachment is missing from storage: the tenth attempt fails and is the last (OUTBOX_MAX_ATTEMPTS default 10).
    const row = await until('the message to be marked failed', async () => {
      const r = await db('outbox_messages').where({ id }).first('status', 'attempts', 'last_error');
      return r.status === 'failed' ? r : undefined;
    });
    expect(row.attempts).toBe(10);
    expect(row.last_error).toMatch(/missing from storage/);
    // Given up on: the message is on the dead-letter queue, with its organisation.
    const dead = await db('pgboss.job')
      .where({ name: 'mail-dead.default' })
      .whereRaw(`data ->> 'outboxId' = ?`, [id])
      .select('state', 'data');
    expect(dead).toHaveLength(1);
    expect(dead[0].state).toBe('created');
    expect(dead[0].data.organisationId).toBe(org.id);
  });
});
