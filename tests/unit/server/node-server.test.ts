/**
 * The production server's client-file lookup (src/lib/server/http/node-server.ts): which request
 * paths name a file of the client folder, listed once at start. Only listed files are ever
 * found, so no spelling of a path reaches outside the folder, and dotfiles stay out.
 */
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { clientFileFor, createRequestListener, listClientFiles } from '@/lib/server/http/node-server';

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

describe('what Astro makes of a request that names another host or scheme', () => {
  /** The URL (and the headers) Astro's createRequest builds for one request through the listener. */
  async function seenByAstro(headers: Record<string, string>) {
    const { NodeApp } = await import('astro/app/node');
    const server = http.createServer(
      createRequestListener(
        (req, res) => {
          const request = NodeApp.createRequest(req, { skipBody: true });
          res.setHeader('content-type', 'application/json');
          res.end(
            JSON.stringify({
              url: request.url,
              forwarded: ['x-forwarded-host', 'x-forwarded-proto', 'x-forwarded-port', 'forwarded'].filter(
                (name) => request.headers.has(name),
              ),
              forwardedFor: request.headers.get('x-forwarded-for'),
            }),
          );
        },
        dir,
        files,
      ),
    );
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    try {
      const { port } = server.address() as AddressInfo;
      return await new Promise<{ url: string; forwarded: string[]; forwardedFor: string | null }>(
        (resolve, reject) => {
          const req = http.request(
            { host: '127.0.0.1', port, path: '/api/things?page=2', headers },
            (res) => {
              let body = '';
              res.on('data', (chunk: Buffer) => (body += chunk));
              res.on('end', () => resolve(JSON.parse(body)));
            },
          );
          req.on('error', reject);
          req.end();
        },
      );
    } finally {
      await new Promise((resolve) => server.close(resolve));
    }
  }

  it('ignores X-Forwarded-Proto/-Host/-Port and Forwarded: request.url keeps the connection scheme', async () => {
    const seen = await seenByAstro({
      host: 'attacker.example',
      'x-forwarded-proto': 'https',
      'x-forwarded-host': 'attacker.example:8443',
      'x-forwarded-port': '8443',
      forwarded: 'for=198.51.100.7;host=attacker.example;proto=https',
    });
    expect(seen.url).toBe('http://localhost/api/things?page=2');
    expect(seen.forwarded).toEqual([]);
  });

  it('leaves X-Forwarded-For to the client-address hook (TRUST_PROXY decides there)', async () => {
    const seen = await seenByAstro({ 'x-forwarded-for': '198.51.100.7', 'x-forwarded-proto': 'https' });
    expect(seen.url).toBe('http://localhost/api/things?page=2');
    expect(seen.forwardedFor).toBe('198.51.100.7');
  });
});
