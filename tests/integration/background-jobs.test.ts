/**
 * Background work on the job queue with two server instances on one database of their own
 * (so the suite's other organisations get no scheduled reminders): the daily re-inspection
 * reminders run by themselves, once per organisation per day however many instances sweep; and
 * the owner's jobs page lists the organisation's own jobs only, with retry of a dead message.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import knex, { type Knex } from 'knex';
import pg from 'pg';
import PgBoss from 'pg-boss';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { JobList } from '../../src/lib/api/jobs';
import { freePort, projectRoot, startAppServer, type RunningServer } from '../../src/cli/services';
import { bossDb } from '../../src/lib/server/jobs/boss';
import { seedOrganisation, type MinimalOrganisation } from './support/signing-seed';

let adminUrl: string;
let databaseName: string;
let dataDir: string;
let db: Knex;
const servers: RunningServer[] = [];
let orgA: MinimalOrganisation;
let orgB: MinimalOrganisation;

/** An organisation whose owner reads office mail, with one gate due in five days. */
async function dueOrganisation(label: string): Promise<MinimalOrganisation> {
  const org = await seedOrganisation(db, label);
  await db('users').where({ id: org.office.id }).update({ role: 'owner' });
  const [site] = await db('sites')
    .insert({
      organisation_id: org.id,
      client_id: org.clientId,
      name: 'Yard',
      address_line1: '4 Kettle Row',
      city: 'Brackwater',
      postal_code: '80998',
      usage_class: 2,
    })
    .returning('id');
  await db('gates').insert({
    organisation_id: org.id,
    site_id: site.id,
    label: `${label} gate`,
    kind: 'swing',
    next_inspection_due: db.raw(`current_date + 5`),
  });
  return org;
}

beforeAll(async () => {
  adminUrl = inject('adminDatabaseUrl');
  databaseName = `latchwell_jobs_${randomBytes(4).toString('hex')}`;
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  const owner = new URL(inject('migrationDatabaseUrl')).username;
  await admin.query(`create database "${databaseName}" owner "${decodeURIComponent(owner)}"`);
  await admin.end();
  const url = new URL(inject('migrationDatabaseUrl'));
  url.pathname = `/${databaseName}`;
  const databaseUrl = url.toString();
  // Knex loads the .ts migrations with Node's own import(), which a vitest worker cannot serve: migrate in a tsx child.
  const migrated = spawnSync(
    process.execPath,
    [
      '--import',
      'tsx',
      '-e',
      `import('./src/cli/migrate.ts').then((m) => m.migrateLatest(${JSON.stringify(databaseUrl)}))`,
    ],
    { cwd: projectRoot, encoding: 'utf8' },
  );
  if (migrated.status !== 0) throw new Error(`migrating the jobs test database failed: ${migrated.stderr}`);
  db = knex({ client: 'pg', connection: databaseUrl, pool: { min: 0, max: 3 } });
  orgA = await dueOrganisation('jobs-a');
  orgB = await dueOrganisation('jobs-b');
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-jobs-'));
  for (const name of ['a', 'b'])
    servers.push(
      await startAppServer({
        port: await freePort(),
        quiet: true,
        env: {
          DATABASE_URL: databaseUrl,
          // No mail goes out: the messages stay queued for the jobs page to list.
          OUTBOX_WORKER: 'off',
          SMTP_URL: `smtp://127.0.0.1:${await freePort()}`,
          AUTH_SECRET: 'integration-test-secret-0123456789abcdef',
          AUTH_TRUST_HOST: 'true',
          LATCHWELL_DATA_DIR: path.join(dataDir, name),
          LATCHWELL_ENV: 'test',
          // Any hour of the organisation's day will do.
          REINSPECTION_REMINDER_HOUR: '0',
        },
      }),
    );
}, 180_000);

afterAll(async () => {
  await Promise.all(servers.map((s) => s.stop()));
  await db?.destroy();
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  await admin.query(`drop database if exists "${databaseName}" with (force)`);
  await admin.end();
  if (dataDir) fs.rmSync(dataDir, { recursive: true, force: true });
});

async function until<T>(what: string, probe: () => Promise<T | undefined | false>, timeoutMs = 30_000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

const reminders = (organisationId: string) =>
  db('outbox_messages')
    .where({ organisation_id: organisationId, kind: 'reinspection_reminder' })
    .select('id', 'subject', 'status');

/** Signs in against one instance exactly as a browser would (CSRF cookie, credentials callback). */
async function signInAt(baseUrl: string, email: string, password: string) {
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
    throw new Error(`could not sign ${email} in`);
  return send;
}

describe('scheduled re-inspection reminders', () => {
  it('are queued by themselves, once per organisation per day, with two instances sweeping', async () => {
    // Nobody pressed a button: each instance's start-up sweep and the schedule do it.
    for (const org of [orgA, orgB])
      await until(`the reminder of ${org.id}`, async () => (await reminders(org.id)).length > 0);
    const schedule = await db('pgboss.schedule').where({ name: 'reinspection-sweep.default' }).first('cron');
    expect(schedule?.cron).toBe('0 * * * *');

    // More sweeps on the same day, on whichever instance takes them, find the day done.
    const boss = new PgBoss({ db: bossDb(db), migrate: false });
    const sweeps = [
      await boss.send('reinspection-sweep.default', { organisationId: null }),
      await boss.send('reinspection-sweep.default', { organisationId: null }),
    ];
    await until('both sweeps to finish', async () => {
      const { rows } = await db.raw(
        `select count(*)::int as n from (select id, state from pgboss.job union all select id, state from pgboss.archive) j
          where id = any(?::uuid[]) and state = 'completed'`,
        [sweeps as string[]],
      );
      return rows[0].n === 2;
    });
    // Let any reminders job those sweeps queued run too.
    await until('no reminders job left', async () => {
      const [{ n }] = await db('pgboss.job')
        .where('name', 'reinspection-reminders.default')
        .whereIn('state', ['created', 'retry', 'active'])
        .count({ n: '*' });
      return Number(n) === 0;
    });

    for (const org of [orgA, orgB]) {
      const runs = await db('reinspection_reminder_runs')
        .where({ organisation_id: org.id })
        .select(db.raw('run_on::text as day'));
      expect(runs).toHaveLength(1);
      const [{ today }] = (
        await db.raw(
          `select (now() at time zone time_zone)::date::text as today from organisations where id = ?`,
          [org.id],
        )
      ).rows;
      expect(runs[0].day).toBe(today);
      const mail = await reminders(org.id);
      expect(mail).toHaveLength(1);
      expect(mail[0].subject).toBe('Re-inspection due: 1 gate');
    }
  });
});

describe('the owner’s jobs page', () => {
  it('lists the organisation’s own jobs only, and only to its owner', async () => {
    const ownerA = await signInAt(servers[0]!.url, orgA.office.email, orgA.password);
    const list = (await (await ownerA('/api/jobs')).json()) as JobList;
    const [mailA] = await reminders(orgA.id);
    const [mailB] = await reminders(orgB.id);
    const mailJobs = list.items.filter((j) => j.queue === 'mail');
    expect(mailJobs.map((j) => j.about)).toEqual(['Re-inspection due: 1 gate']);
    expect(mailJobs[0]!.status).toBe('queued');
    expect(list.counts.queued).toBeGreaterThanOrEqual(1);
    // Nothing of the other organisation's, by id either.
    const bJobIds = (
      await db('pgboss.job').whereRaw(`data ->> 'organisationId' = ?`, [orgB.id]).select('id')
    ).map((r) => r.id);
    expect(bJobIds.length).toBeGreaterThan(0);
    expect(list.items.some((j) => bJobIds.includes(j.id))).toBe(false);
    expect(mailA && mailB).toBeTruthy();

    const page = await ownerA('/jobs');
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('Re-inspection due: 1 gate');

    // A job that has not failed cannot be retried.
    const retryQueued = await ownerA(`/api/jobs/${mailJobs[0]!.id}/retry`, { method: 'POST' });
    expect(retryQueued.status).toBe(409);

    // Not the owner: no page, no list.
    await db('users').insert({
      organisation_id: orgA.id,
      email: `office2.${orgA.id}@fixtures.test`,
      name: 'Second office',
      role: 'office',
      password_hash: (await db('users').where({ id: orgA.office.id }).first('password_hash')).password_hash,
    });
    const office = await signInAt(servers[1]!.url, `office2.${orgA.id}@fixtures.test`, orgA.password);
    expect((await office('/api/jobs')).status).toBe(403);
    expect((await office('/jobs')).status).toBe(403);
  });

  it('retries a dead message for its own organisation only', async () => {
    // B's reminder was given up on: the row is failed and the message is on the dead-letter queue.
    const [mailB] = await reminders(orgB.id);
    let deadId = '';
    await db.transaction(async (trx) => {
      await trx('outbox_messages')
        .where({ id: mailB!.id })
        .update({ status: 'failed', attempts: 10, last_error: 'connect ECONNREFUSED' });
      deadId = (await new PgBoss({ db: bossDb(trx), migrate: false }).send('mail-dead.default', {
        organisationId: orgB.id,
        outboxId: mailB!.id,
        lastError: 'connect ECONNREFUSED',
      }))!;
    });

    const ownerA = await signInAt(servers[1]!.url, orgA.office.email, orgA.password);
    expect((await ownerA(`/api/jobs/${deadId}/retry`, { method: 'POST' })).status).toBe(404);
    expect(await db('pgboss.job').where({ id: deadId }).first('state')).toMatchObject({ state: 'created' });
    expect(await db('outbox_messages').where({ id: mailB!.id }).first('status')).toMatchObject({
      status: 'failed',
    });

    const ownerB = await signInAt(servers[0]!.url, orgB.office.email, orgB.password);
    const before = (await (await ownerB('/api/jobs')).json()) as JobList;
    const dead = before.items.find((j) => j.id === deadId);
    expect(dead).toMatchObject({ status: 'dead', canRetry: true, error: 'connect ECONNREFUSED' });
    expect(before.counts.dead).toBe(1);
    const retried = await ownerB(`/api/jobs/${deadId}/retry`, { method: 'POST' });
    expect(retried.status, await retried.clone().text()).toBe(202);
    expect(await db('pgboss.job').where({ id: deadId }).first('id')).toBeUndefined();
    expect(await db('outbox_messages').where({ id: mailB!.id }).first('status', 'attempts')).toEqual({
      status: 'queued',
      attempts: 0,
    });
    const jobs = await db('pgboss.job')
      .where({ name: 'mail.default' })
      .whereRaw(`data ->> 'outboxId' = ?`, [mailB!.id])
      .whereIn('state', ['created', 'retry'])
      .select('id');
    expect(jobs.length).toBeGreaterThanOrEqual(1);
    const audit = await db('audit_events')
      .where({ organisation_id: orgB.id, action: 'job.retried' })
      .first('entity_id');
    expect(audit?.entity_id).toBe(deadId);
  });
});
