/**
 * Faults, against a PostgreSQL cluster of this file's own (so stopping it disturbs nothing
 * else): the database stops during load → the API answers 503 problem details, the server
 * stays up and serves again once the database is back, without a restart; the server is
 * killed in the middle of saves → no half-written assessment, and the client's retry works.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import knex, { type Knex } from 'knex';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { freePort, projectRoot, startAppServer, type RunningServer } from '../../src/cli/services';
import { hashPassword } from '../../src/lib/server/passwords';

const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-faults-'));
fs.chmodSync(dataDir, 0o755);
let clusterEnv: Record<string, string>;
let databaseUrl: string;
let db: Knex;
let serverPort: number;
let draftId: string;
const password = 'faults-pass-2026';
const email = `auditor.${Date.now()}@faults.test`;

function launcher(command: 'start' | 'stop') {
  const { DATABASE_URL: _ignored, ...rest } = process.env;
  const result = spawnSync(
    process.execPath,
    [path.join(projectRoot, 'node_modules/tsx/dist/cli.mjs'), 'db/launcher.ts', command],
    {
      cwd: projectRoot,
      env: { ...rest, ...clusterEnv },
      encoding: 'utf8',
      timeout: 90_000,
    },
  );
  if (result.status !== 0) throw new Error(`launcher ${command} failed: ${result.stderr}`);
  return result.stdout.trim().split('\n').at(-1)!;
}

function startServer(): Promise<RunningServer> {
  return startAppServer({
    port: serverPort,
    quiet: true,
    env: {
      ...inject('serverEnv'),
      DATABASE_URL: databaseUrl,
      PUBLIC_URL: `http://127.0.0.1:${serverPort}`,
      OUTBOX_WORKER: 'off',
      LATCHWELL_DATA_DIR: path.join(dataDir, 'files'),
    },
  });
}

async function signIn(base: string): Promise<string> {
  const jar: string[] = [];
  const keep = (res: Response) => res.headers.getSetCookie().forEach((line) => jar.push(line.split(';')[0]));
  const csrf = await fetch(`${base}/api/auth/csrf`);
  keep(csrf);
  const { csrfToken } = await csrf.json();
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: {
      'content-type': 'application/x-www-form-urlencoded',
      cookie: jar.join('; '),
      origin: base,
      'x-forwarded-for': '198.18.7.7',
    },
    body: new URLSearchParams({ email, password, csrfToken, callbackUrl: '/' }),
  });
  keep(res);
  return jar.join('; ');
}

beforeAll(async () => {
  clusterEnv = {
    LATCHWELL_DATA_DIR: dataDir,
    LATCHWELL_PG_PORT: String(await freePort()),
    LATCHWELL_PG_FSYNC: 'off',
    LATCHWELL_QUIET: '1',
  };
  databaseUrl = launcher('start');
  // Knex loads .ts migrations through tsx, so migrate and publish in a tsx process.
  for (const script of ['src/cli/migrate.ts', 'src/cli/publish-rulesets.ts']) {
    const done = spawnSync(
      process.execPath,
      [path.join(projectRoot, 'node_modules/tsx/dist/cli.mjs'), script],
      {
        cwd: projectRoot,
        // The cluster's own endpoints: migrations run as its owner role, the server as its app role.
        env: {
          ...Object.fromEntries(Object.entries(process.env).filter(([k]) => k !== 'DATABASE_URL')),
          ...clusterEnv,
        },
        encoding: 'utf8',
      },
    );
    if (done.status !== 0) throw new Error(`${script} failed: ${done.stderr}`);
  }
  db = knex({ client: 'pg', connection: databaseUrl, pool: { min: 0, max: 2 } });
  const [org] = await db('organisations')
    .insert({ name: 'Fault Drill Gates', slug: `faults-${Date.now()}` })
    .returning('id');
  const [auditor] = await db('users')
    .insert({
      organisation_id: org.id,
      email,
      name: 'Fault Drill Auditor',
      role: 'auditor',
      password_hash: await hashPassword(password),
    })
    .returning('id');
  const [client] = await db('clients')
    .insert({ organisation_id: org.id, name: 'Drill client', kind: 'homeowner' })
    .returning('id');
  const [site] = await db('sites')
    .insert({
      organisation_id: org.id,
      client_id: client.id,
      address_line1: '1 Drill Yard',
      city: 'Testbury',
      usage_class: 1,
    })
    .returning('id');
  const [gate] = await db('gates')
    .insert({
      organisation_id: org.id,
      site_id: site.id,
      label: 'Drill gate',
      kind: 'swing',
      opening_direction: 'pull_to_open',
      operator: JSON.stringify({ listed: true, automaticClosing: false }),
    })
    .returning('id');
  const version = await db('ruleset_versions as rv')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .where({ 'r.family': 'north-american-gate', 'rv.status': 'published' })
    .orderBy('rv.published_at', 'desc')
    .first('rv.id');
  const [draft] = await db('assessments')
    .insert({
      organisation_id: org.id,
      gate_id: gate.id,
      ruleset_version_id: version.id,
      auditor_id: auditor.id,
    })
    .returning('id');
  draftId = draft.id;
  serverPort = await freePort();
}, 180_000);

afterAll(async () => {
  await db?.destroy();
  try {
    launcher('stop');
  } catch {
    /* already stopped */
  }
  fs.rmSync(dataDir, { recursive: true, force: true });
});

describe('faults', () => {
  it(
    'answers 503 problem details while PostgreSQL is stopped, stays up, and serves again when it returns',
    { timeout: 120_000 },
    async () => {
      const server = await startServer();
      try {
        const cookie = await signIn(server.url);
        const seen: Array<{ at: number; status: number; type: string }> = [];
        const started = Date.now();
        let phase: 'before' | 'down' | 'after' = 'before';
        let stopAt = Number.POSITIVE_INFINITY;
        const worker = async () => {
          while (Date.now() < stopAt) {
            const res = await fetch(`${server.url}/api/assessments/${draftId}`, {
              headers: { cookie, origin: server.url },
            }).catch(() => null);
            if (!res) throw new Error('the server stopped answering');
            await res.arrayBuffer();
            seen.push({
              at: Date.now() - started,
              status: res.status,
              type: `${phase}:${res.headers.get('content-type')}`,
            });
          }
        };
        const load = Promise.all(Array.from({ length: 8 }, worker));
        await new Promise((r) => setTimeout(r, 2500));
        launcher('stop');
        phase = 'down';
        await new Promise((r) => setTimeout(r, 4000));
        launcher('start');
        phase = 'after';
        // Keep the load on until the first success after the restart, then two more seconds.
        const restartedAt = Date.now() - started;
        const deadline = Date.now() + 30_000;
        while (Date.now() < deadline && !seen.some((s) => s.at > restartedAt && s.status === 200))
          await new Promise((r) => setTimeout(r, 100));
        stopAt = Date.now() + 2000;
        await load;
        const endedAt = Date.now() - started;

        const statuses = new Set(seen.map((s) => s.status));
        const bySecond = new Map<number, string>();
        for (const s of seen)
          bySecond.set(
            Math.floor(s.at / 1000),
            `${bySecond.get(Math.floor(s.at / 1000)) ?? ''}${s.status === 200 ? '.' : 'x'}`,
          );
        console.log(
          `[faults] ${seen.length} requests, ${seen.filter((s) => s.status === 503).length} answered 503; per second (. 200, x 503):\n${[...bySecond].map(([k, v]) => `  ${k}s ${v}`).join('\n')}`,
        );
        expect(
          [...statuses].every((s) => s === 200 || s === 503),
          `statuses seen: ${[...statuses]}`,
        ).toBe(true);
        const outage = seen.filter((s) => s.status === 503);
        expect(outage.length).toBeGreaterThan(0);
        expect(outage.every((s) => s.type.endsWith('application/problem+json'))).toBe(true);
        expect(server.child.exitCode).toBeNull(); // nothing crashed
        const lastSecond = seen.filter((s) => s.at > endedAt - 1000);
        expect(lastSecond.length).toBeGreaterThan(0);
        expect(lastSecond.every((s) => s.status === 200)).toBe(true); // serving again, no restart
      } finally {
        await server.stop();
      }
    },
  );

  it(
    'leaves no half-written assessment when the server is killed during saves, and the retry wins',
    { timeout: 240_000 },
    async () => {
      for (let round = 0; round < 3; round++) {
        const server = await startServer();
        const cookie = await signIn(server.url);
        const before = await db('assessments').where({ id: draftId }).first('answers', 'row_version');
        const note = `round ${round} `.repeat(150).slice(0, 1900).trim(); // the API trims notes
        const body = JSON.stringify({
          answers: {
            latchFitted: { value: 'no', note },
            placardsLegible: { value: 'yes', note },
            pedestrianEntrance: { value: 'yes', note },
          },
        });
        const save = () =>
          fetch(`${server.url}/api/assessments/${draftId}`, {
            method: 'PATCH',
            headers: {
              cookie,
              origin: server.url,
              'content-type': 'application/json',
              'if-match': `"${before.row_version}"`,
            },
            body,
          });
        const inFlight = Array.from({ length: 6 }, () =>
          save().then(
            (r) => r.status,
            () => 'dropped',
          ),
        );
        await new Promise((r) => setTimeout(r, [30, 150, 600][round]));
        server.child.kill('SIGKILL');
        const outcomes = await Promise.all(inFlight);
        await server.stop();

        const after = await db('assessments').where({ id: draftId }).first('answers', 'row_version');
        const wrote = after.row_version !== before.row_version;
        // Either nothing happened or exactly one whole save did: never a part of one.
        if (wrote) {
          expect(after.row_version).toBe(before.row_version + 1);
          expect(after.answers).toEqual(JSON.parse(body).answers);
        } else {
          expect(after.answers).toEqual(before.answers);
        }
        console.log(
          `[faults] round ${round}: ${outcomes.join(', ')} → ${wrote ? 'one save landed whole' : 'nothing landed'}`,
        );

        // The client retries against a fresh server with the version it now reads.
        const again = await startServer();
        const retryCookie = await signIn(again.url);
        const current = await (
          await fetch(`${again.url}/api/assessments/${draftId}`, {
            headers: { cookie: retryCookie, origin: again.url },
          })
        ).json();
        const retry = await fetch(`${again.url}/api/assessments/${draftId}`, {
          method: 'PATCH',
          headers: {
            cookie: retryCookie,
            origin: again.url,
            'content-type': 'application/json',
            'if-match': `"${current.rowVersion}"`,
          },
          body: JSON.stringify({ answers: { latchFitted: { value: 'yes', note: `retry ${round}` } } }),
        });
        expect(retry.status).toBe(200);
        await again.stop();
      }
    },
  );
});
