/**
 * The production server's client-file lookup (src/lib/server/http/node-server.ts): which request
 * paths name a file of the client folder, listed once at start. Only listed files are ever
 * found, so no spelling of a path reaches outside the folder, and dotfiles stay out.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { clientFileFor, listClientFiles } from '@/lib/server/http/node-server';

let dir: string;
let files: Map<string, string>;

beforeAll(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-client-'));
  const put = (name: string) => {
    fs.mkdirSync(path.dirname(path.join(dir, name)), { recursive: true });
    fs.writeFileSync(path.join(dir, name), name);
  };
  for (const name of [
    'favicon.svg',
    '_astro/app.Ab12.js',
    '.env',
    '.cache/x.txt',
    '.well-known/security.txt',
    'guide/index.html',
    'a b.txt',
  ])
    put(name);
  files = listClientFiles(dir);
});

afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

describe('listing the client folder', () => {
  it('names each file by its URL path, leaves dotfiles out and names a folder by its index.html', () => {
    expect([...files.keys()].sort()).toEqual(
      [
        '/.well-known/security.txt',
        '/_astro/app.Ab12.js',
        '/a b.txt',
        '/favicon.svg',
        '/guide',
        '/guide/',
        '/guide/index.html',
      ].sort(),
    );
    expect(files.get('/guide')).toBe('/guide/index.html');
  });

  it('is empty for a folder that does not exist', () => {
    expect(listClientFiles(path.join(dir, 'missing')).size).toBe(0);
  });
});

describe('finding the file a request names', () => {
  it.each([
    ['/favicon.svg', '/favicon.svg'],
    ['/favicon.svg?v=2#top', '/favicon.svg'],
    ['//favicon.svg', '/favicon.svg'],
    ['/%66avicon.svg', '/favicon.svg'],
    ['/_astro/app.Ab12.js', '/_astro/app.Ab12.js'],
    ['/a%20b.txt', '/a b.txt'],
    ['/guide', '/guide/index.html'],
    ['/.well-known/security.txt', '/.well-known/security.txt'],
  ])('%s is %s', (url, file) => {
    expect(clientFileFor(url, files)).toBe(file);
  });

  it.each([
    '/',
    '/api/health',
    '/assessments/1',
    '/.env',
    '/.cache/x.txt',
    '/_astro',
    '/favicon.svg/',
    '/FAVICON.SVG',
    '/../package.json',
    '/_astro/../../package.json',
    '/..%2F..%2Fpackage.json',
    '/%2e%2e/%2e%2e/etc/passwd',
    '/_astro/..%2F..%2Fserver%2Fentry.mjs',
    '/favicon.svg%00',
    '/%E0%A4%A',
  ])('%s is no file', (url) => {
    expect(clientFileFor(url, files)).toBeNull();
  });
});
