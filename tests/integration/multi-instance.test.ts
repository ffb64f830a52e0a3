/**
 * Two app instances against one PostgreSQL and one S3-compatible store, as behind a load
 * balancer: a session made on one is valid on the other, a save on one is read on the other,
 * a file uploaded through one is served by the other, and while both run their mail workers
 * each outbox message goes out exactly once.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import S3rver from 's3rver';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { freePort, startAppServer, type RunningServer } from '../../src/cli/services';
import {
  createOrganisation,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { currentVersion, insertDraft, seedDirectory } from './support/domain';
import { queueOutboxMessages } from './support/outbox';

const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-two-'));
let s3: S3rver;
const servers: RunningServer[] = [];
let org: FixtureOrganisation;
let auditorOnA: TestClient;
/** Both instances serve one public address (PUBLIC_URL), as behind a load balancer. */
const publicUrl = inject('serverEnv').PUBLIC_URL;

/** Requests to instance B carrying the cookie the fixture client got from instance A. */
function onB(client: TestClient, pathname: string, init: RequestInit = {}) {
  const b = servers[1];
  return fetch(`${b.url}${pathname}`, {
    ...init,
    headers: { ...(init.headers as Record<string, string>), cookie: client.cookie, origin: publicUrl },
    redirect: 'manual',
  });
}

beforeAll(async () => {
  const s3Port = await freePort();
  s3 = new S3rver({
    address: '127.0.0.1',
    port: s3Port,
    silent: true,
    directory: path.join(tmp, 's3'),
    configureBuckets: [{ name: 'shared-files', configs: [] }],
  });
  await s3.run();
  const shared = {
    ...inject('serverEnv'),
    STORAGE_DRIVER: 's3',
    S3_ENDPOINT: `http://127.0.0.1:${s3Port}`,
    S3_BUCKET: 'shared-files',
    S3_REGION: 'us-east-1',
    S3_ACCESS_KEY_ID: 'S3RVER',
    S3_SECRET_ACCESS_KEY: 'S3RVER',
    OUTBOX_POLL_MS: '100',
    OUTBOX_BATCH_SIZE: '3',
  };
  for (const name of ['a', 'b']) {
    // Each instance has its own local folder: anything shared must go through PostgreSQL or S3.
    servers.push(
      await startAppServer({
        port: await freePort(),
        quiet: true,
        env: { ...shared, LATCHWELL_DATA_DIR: path.join(tmp, name) },
      }),
    );
  }
  org = await createOrganisation('two-instances');
  auditorOnA = await signIn(org.auditor.email, org.auditor.password!);
}, 120_000);

afterAll(async () => {
  await Promise.all(servers.map((s) => s.stop()));
  await s3?.close();
  fs.rmSync(tmp, { recursive: true, force: true });
});

/** The fixture client talks to the suite's main server; re-point it at instance A. */
function onA(client: TestClient, pathname: string, init: RequestInit = {}) {
  const a = servers[0];
  return fetch(`${a.url}${pathname}`, {
    ...init,
    headers: { ...(init.headers as Record<string, string>), cookie: client.cookie, origin: publicUrl },
    redirect: 'manual',
  });
}

describe('two app instances behind one load balancer', () => {
  it('accepts a session made on one instance on the other', async () => {
    const a = await onA(auditorOnA, '/api/clients');
    const b = await onB(auditorOnA, '/api/clients');
    expect(a.status).toBe(200);
    expect(b.status).toBe(200);
    expect(await b.json()).toEqual(await a.json());
    const signedOut = await fetch(`${servers[1].url}/api/clients`);
    expect(signedOut.status).toBe(401);
  });

  it('shows a save made through one instance when read through the other', async () => {
    const dir = await seedDirectory(org);
    const version = await currentVersion('north-american-gate');
    const id = await insertDraft(org.id, dir.gateId, org.auditor.id, version.id);
    const saved = await onA(auditorOnA, `/api/assessments/${id}`, {
      method: 'PATCH',
      headers: { 'content-type': 'application/json', 'if-match': '"1"' },
      body: JSON.stringify({ answers: { latchFitted: { value: 'no', note: 'saved through A' } } }),
    });
    expect(saved.status, await saved.clone().text()).toBe(200);
    const read = await (await onB(auditorOnA, `/api/assessments/${id}`)).json();
    expect(read.rowVersion).toBe(2);
    expect(read.answers.latchFitted).toEqual({ value: 'no', note: 'saved through A' });
    // And B refuses the stale version A already moved past.
    const stale = await onB(auditorOnA, `/api/assessments/${id}`, {
      method: 'PATCH',
      headers: { 'content-type': 'application/json', 'if-match': '"1"' },
      body: JSON.stringify({ answers: { latchFitted: { value: 'yes' } } }),
    });
    expect(stale.status).toBe(409);
  });

  it('serves a photo uploaded through one instance from the other (shared object storage)', async () => {
    const dir = await seedDirectory(org);
    const version = await currentVersion('north-american-gate');
    const id = await insertDraft(org.id, dir.gateId, org.auditor.id, version.id);
    const jpeg = await sharp({
      create: { width: 64, height: 48, channels: 3, background: { r: 200, g: 120, b: 30 } },
    })
      .jpeg()
      .toBuffer();
    const form = new FormData();
    form.set('photo', new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' }), 'hinge.jpg');
    form.set('itemKey', 'latchFitted');
    const uploaded = await onA(auditorOnA, `/api/assessments/${id}/photos`, { method: 'POST', body: form });
    expect(uploaded.status, await uploaded.clone().text()).toBe(201);
    const photo = await uploaded.json();
    const listed = await (await onB(auditorOnA, `/api/assessments/${id}/photos`)).json();
    const item = (Array.isArray(listed) ? listed : listed.items).find(
      (p: { id: string }) => p.id === photo.id,
    );
    expect(item).toBeDefined();
    const url: string = item.thumbnailUrl ?? item.urls?.thumbnail ?? item.displayUrl ?? item.urls?.display;
    expect(url).toBeTruthy();
    const served = await onB(auditorOnA, url);
    expect(served.status).toBe(200);
    expect(served.headers.get('content-type')).toMatch(/^image\//);
    expect((await served.arrayBuffer()).byteLength).toBeGreaterThan(100);
  });

  it(
    'sends each outbox message exactly once while both instances run their workers',
    { timeout: 60_000 },
    async () => {
      const recipient = `once.${Date.now()}@example.test`;
      const count = 24;
      await queueOutboxMessages(
        testDb(),
        Array.from({ length: count }, (_, i) => ({
          organisation_id: org.id,
          kind: 'test_message',
          to_addresses: [recipient],
          subject: `exactly once #${i}`,
          text_body: `message ${i}`,
        })),
      );
      // Wake both workers (each starts on the first request its process handles).
      await Promise.all(servers.map((s) => fetch(`${s.url}/api/health`)));
      const deadline = Date.now() + 45_000;
      let sent = 0;
      while (Date.now() < deadline) {
        const row = await testDb()('outbox_messages')
          .where({ organisation_id: org.id, kind: 'test_message', status: 'sent' })
          .count({ n: '*' })
          .first();
        sent = Number(row?.n);
        if (sent === count) break;
        await new Promise((r) => setTimeout(r, 200));
      }
      const unsent = await testDb()('outbox_messages')
        .where({ organisation_id: org.id, kind: 'test_message' })
        .whereNot({ status: 'sent' })
        .select('status', 'attempts', 'last_error');
      expect(sent, JSON.stringify(unsent.slice(0, 3))).toBe(count);
      const caught = (await (await fetch(`${inject('catcherUrl')}/messages`)).json()) as Array<{
        to: string[];
        subject: string;
      }>;
      const mine = caught
        .filter((m) => m.to.includes(recipient))
        .map((m) => m.subject)
        .sort();
      expect(mine).toHaveLength(count);
      expect(new Set(mine).size).toBe(count);
    },
  );
});
