/**
 * Oversize bodies are refused while they stream, not after they have filled memory: a 60 MB
 * chunked body (no Content-Length) at the sign-in callback, the force-trace upload and the
 * photo upload gets 413 problem+json naming the limit, and the server process's peak memory
 * grows by no more than what the route may keep (its limit) twice over plus a few MB.
 *
 * The server here is a dedicated instance (same database and settings as the suite's), so
 * that other test files' requests do not move its memory while it is measured. Peak resident
 * memory is the kernel's VmHWM for the process, reset (clear_refs 5) just before each upload.
 */
import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { freePort, startAppServer, type RunningServer } from '../../src/cli/services';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { currentVersion, insertDraft, seedDirectory } from './support/domain';
import { rawRequest } from './support/raw-http';

const MiB = 1024 * 1024;
const bodyBytes = 60 * MiB;
/**
 * How far the peak may rise for a route that keeps at most `limit` bytes: the kept bytes, the
 * same again because the adapter's web stream copies each chunk off the socket's buffer (the
 * originals are garbage until the next collection), and a few MB for buffers and the answer.
 */
const allowedGrowth = (limit: number) => 2 * limit + 8 * MiB;

let server: RunningServer;
let org: FixtureOrganisation;
let auditor: TestClient;
let draftId: string;

function memoryOf(pid: number): { rss: number; peak: number } {
  const status = fs.readFileSync(`/proc/${pid}/status`, 'utf8');
  const kib = (name: string) =>
    Number(new RegExp(`^${name}:\\s+(\\d+) kB`, 'm').exec(status)?.[1] ?? NaN) * 1024;
  return { rss: kib('VmRSS'), peak: kib('VmHWM') };
}

/** Sends the request and says by how much the server's peak resident memory rose meanwhile. */
async function measured<T>(send: () => Promise<T>): Promise<{ result: T; growth: number }> {
  const pid = server.child.pid!;
  // Resets VmHWM to the current resident size (proc(5), /proc/pid/clear_refs).
  fs.writeFileSync(`/proc/${pid}/clear_refs`, '5');
  const before = memoryOf(pid).rss;
  const result = await send();
  // Let the server finish with the connection before reading the peak.
  await new Promise((r) => setTimeout(r, 200));
  return { result, growth: memoryOf(pid).peak - before };
}

const stream = (path: string, headers: Record<string, string>, prefix?: Buffer) =>
  rawRequest(new URL(path, server.url), {
    method: 'POST',
    headers: { origin: server.url, accept: 'application/json', ...headers },
    streamBytes: bodyBytes,
    streamPrefix: prefix,
  });

const traceQuery = new URLSearchParams({
  itemKey: 'forceTest.closing_edge',
  location: 'closing_edge',
  direction: 'closing',
  gapMm: '300',
  fileName: 'edge.csv',
});
const boundary = 'latchwell-test-boundary';
const photoPrefix = Buffer.from(
  `--${boundary}\r\nContent-Disposition: form-data; name="itemKey"\r\n\r\nhingeGapMm\r\n--${boundary}\r\nContent-Disposition: form-data; name="photo"; filename="huge.jpg"\r\nContent-Type: image/jpeg\r\n\r\n`,
);

beforeAll(async () => {
  const port = await freePort();
  server = await startAppServer({
    port,
    quiet: true,
    env: { ...inject('serverEnv'), PUBLIC_URL: `http://127.0.0.1:${port}`, OUTBOX_WORKER: 'off' },
  });
  org = await createOrganisation('body limits');
  const dir = await seedDirectory(org);
  draftId = await insertDraft(
    org.id,
    dir.gateId,
    org.auditor.id,
    (await currentVersion('north-american-gate')).id,
  );
  auditor = await signIn(org.auditor.email, fixturePassword);
  // Load each route's code once, so its first-use cost is not counted against the body.
  await rawRequest(new URL('/api/auth/callback/credentials', server.url), {
    method: 'POST',
    headers: { origin: server.url, 'content-type': 'application/x-www-form-urlencoded' },
    body: 'email=x',
  });
  await rawRequest(new URL(`/api/assessments/${draftId}/force-traces?${traceQuery}`, server.url), {
    method: 'POST',
    headers: { origin: server.url, cookie: auditor.cookie, 'content-type': 'text/csv' },
    body: 'x',
  });
  await rawRequest(new URL(`/api/assessments/${draftId}/photos`, server.url), {
    method: 'POST',
    headers: {
      origin: server.url,
      cookie: auditor.cookie,
      'content-type': `multipart/form-data; boundary=${boundary}`,
    },
    body: 'x',
  });
}, 90_000);

afterAll(async () => {
  await server?.stop();
});

describe('a 60 MB chunked body is refused while it streams', () => {
  it('at the sign-in callback: 413 problem+json naming the 16 KiB limit, memory within a few MB', async () => {
    const { result, growth } = await measured(() =>
      stream('/api/auth/callback/credentials', { 'content-type': 'application/x-www-form-urlencoded' }),
    );
    expect(result.status).toBe(413);
    expect(growth, `peak memory grew by ${(growth / MiB).toFixed(1)} MiB`).toBeLessThan(
      allowedGrowth(16 * 1024),
    );
    expect(result.headers['content-type']).toBe('application/problem+json');
    const problem = result.json();
    expect(problem.detail).toContain('16 KiB');
    expect(problem.limitBytes).toBe(16 * 1024);
    expect(result.sentBytes).toBeLessThan(bodyBytes);
  });

  it('at the force-trace upload: 413 problem+json naming the 2 MB limit, memory within twice the limit and a few MB', async () => {
    const { result, growth } = await measured(() =>
      stream(`/api/assessments/${draftId}/force-traces?${traceQuery}`, {
        cookie: auditor.cookie,
        'content-type': 'text/csv',
      }),
    );
    expect(result.status).toBe(413);
    expect(growth, `peak memory grew by ${(growth / MiB).toFixed(1)} MiB`).toBeLessThan(
      allowedGrowth(2 * MiB),
    );
    expect(result.headers['content-type']).toBe('application/problem+json');
    const problem = result.json();
    expect(problem.detail).toContain('2 MB');
    expect(problem.limitBytes).toBe(2 * MiB);
    expect(problem.errors).toEqual([{ field: 'csv', message: 'must be at most 2 MB' }]);
  });

  it('at the photo upload: 413 problem+json naming the 15 MB limit, memory within twice the limit and a few MB', async () => {
    const { result, growth } = await measured(() =>
      stream(
        `/api/assessments/${draftId}/photos`,
        { cookie: auditor.cookie, 'content-type': `multipart/form-data; boundary=${boundary}` },
        photoPrefix,
      ),
    );
    expect(result.status).toBe(413);
    expect(growth, `peak memory grew by ${(growth / MiB).toFixed(1)} MiB`).toBeLessThan(
      allowedGrowth(15 * MiB),
    );
    expect(result.headers['content-type']).toBe('application/problem+json');
    const problem = result.json();
    expect(problem.detail).toContain('15 MB');
    expect(problem.limitBytes).toBe(15 * MiB);
  });

  it('refuses an announced Content-Length over the limit before reading the body', async () => {
    // Claims 60 MB but sends a few bytes: the answer comes at once, without waiting for the rest.
    const result = await rawRequest(new URL('/api/auth/callback/credentials', server.url), {
      method: 'POST',
      headers: {
        origin: server.url,
        accept: 'application/json',
        'content-type': 'application/x-www-form-urlencoded',
        'content-length': String(bodyBytes),
      },
      streamBytes: 10,
    });
    expect(result.status).toBe(413);
    expect(result.json().limitBytes).toBe(16 * 1024);
  });
});
