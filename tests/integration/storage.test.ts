/**
 * File storage: both drivers honour the same contract (content-addressed keys, idempotent
 * writes, hash-checked reads, no path traversal). The S3 driver talks to a fake S3 server
 * (s3rver) that this file starts on a free loopback port.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createHash, randomBytes } from 'node:crypto';
import S3rver from 's3rver';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { freePort } from '../../src/cli/services';
import { storageFromEnv, type FileStorage } from '../../src/lib/server/storage';

const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-storage-'));
let s3: S3rver | undefined;
let s3Env: NodeJS.ProcessEnv = {};

beforeAll(async () => {
  const port = await freePort();
  s3 = new S3rver({
    address: '127.0.0.1',
    port,
    silent: true,
    directory: path.join(tmp, 's3'),
    configureBuckets: [{ name: 'latchwell-files', configs: [] }],
  });
  await s3.run();
  s3Env = {
    STORAGE_DRIVER: 's3',
    S3_ENDPOINT: `http://127.0.0.1:${port}`,
    S3_BUCKET: 'latchwell-files',
    S3_REGION: 'us-east-1',
    S3_ACCESS_KEY_ID: 'S3RVER',
    S3_SECRET_ACCESS_KEY: 'S3RVER',
    S3_PREFIX: 'tenant-a/',
  };
});

afterAll(async () => {
  await s3?.close();
  fs.rmSync(tmp, { recursive: true, force: true });
});

const drivers: Array<[string, () => FileStorage]> = [
  ['disk', () => storageFromEnv({ STORAGE_DRIVER: 'disk', LATCHWELL_DATA_DIR: path.join(tmp, 'data') })],
  ['s3', () => storageFromEnv(s3Env)],
];

describe.each(drivers)('%s storage', (name, make) => {
  it('keys a file by the SHA-256 of its bytes and gives the same bytes back', async () => {
    const store = make();
    const bytes = randomBytes(70_000);
    const stored = await store.put(bytes, 'application/octet-stream');
    expect(stored.key).toBe(createHash('sha256').update(bytes).digest('hex'));
    expect(stored.created).toBe(true);
    expect(await store.exists(stored.key)).toBe(true);
    expect(Buffer.compare((await store.get(stored.key))!, bytes)).toBe(0);
    const chunks: Buffer[] = [];
    for await (const chunk of (await store.stream(stored.key))!) chunks.push(Buffer.from(chunk));
    expect(Buffer.compare(Buffer.concat(chunks), bytes)).toBe(0);
  });

  it('writes the same bytes once: a second put is a no-op with the same key', async () => {
    const store = make();
    const bytes = Buffer.from(`same bytes for ${name} ${Date.now()}`);
    const [first, second] = await Promise.all([
      store.put(bytes, 'text/plain'),
      store.put(bytes, 'text/plain'),
    ]);
    expect(second.key).toBe(first.key);
    const third = await store.put(bytes, 'text/plain');
    expect(third.created).toBe(false);
  });

  it('answers null / false for a key that holds nothing', async () => {
    const store = make();
    const missing = 'f'.repeat(64);
    expect(await store.exists(missing)).toBe(false);
    expect(await store.get(missing)).toBeNull();
    expect(await store.stream(missing)).toBeNull();
  });

  it('refuses anything that is not a SHA-256 key, so no path can escape the store', async () => {
    const store = make();
    for (const bad of [
      '../../etc/passwd',
      `../${'a'.repeat(62)}`,
      'A'.repeat(64),
      `${'a'.repeat(63)}/`,
      `${'a'.repeat(64)}\u0000`,
      '',
      'a'.repeat(65),
    ]) {
      await expect(store.get(bad)).rejects.toThrow(/not a storage key/);
      await expect(store.exists(bad)).rejects.toThrow(/not a storage key/);
    }
  });
});

describe('disk storage layout', () => {
  it('keeps files under files/<aa>/<sha256> in the data folder, read-only', async () => {
    const dataDir = path.join(tmp, 'layout');
    const store = storageFromEnv({ LATCHWELL_DATA_DIR: dataDir });
    expect(store.driver).toBe('disk');
    const { key } = await store.put(Buffer.from('gate photo'), 'image/jpeg');
    const file = path.join(dataDir, 'files', key.slice(0, 2), key);
    expect(fs.readFileSync(file, 'utf8')).toBe('gate photo');
    expect(fs.statSync(file).mode & 0o222).toBe(0);
  });

  it('notices a file altered on disk instead of serving it', async () => {
    const dataDir = path.join(tmp, 'tamper');
    const store = storageFromEnv({ LATCHWELL_DATA_DIR: dataDir });
    const { key } = await store.put(Buffer.from('original'), 'text/plain');
    const file = path.join(dataDir, 'files', key.slice(0, 2), key);
    fs.chmodSync(file, 0o644);
    fs.writeFileSync(file, 'altered');
    await expect(store.get(key)).rejects.toThrow(/does not match/);
  });

  it('refuses an unknown driver name', () => {
    expect(() => storageFromEnv({ STORAGE_DRIVER: 'ftp' })).toThrow(/disk" or "s3/);
    expect(() => storageFromEnv({ STORAGE_DRIVER: 's3' })).toThrow(/S3_BUCKET/);
  });
});
