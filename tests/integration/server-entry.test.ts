/**
 * The production server (dist/server/serve.mjs, src/lib/server/http/node-server.ts) answers
 * as the adapter's standalone server did: the client folder's files through `send` (a year's
 * immutable caching for built assets, HEAD without a body), a URL that does not decode is a
 * bare 400, no spelling of a path serves anything outside the client folder, and HEAD and
 * OPTIONS on pages and the API get Astro's answers.
 */
import { describe, expect, inject, it } from 'vitest';
import { rawRequest } from './support/raw-http';

const base = new URL(inject('baseUrl'));

/** A request with the path exactly as given (fetch and URL would normalise `..` and escapes). */
async function exact(method: string, rawPath: string) {
  const answer = await rawRequest(base, { method, rawPath });
  return { status: answer.status, headers: answer.headers, body: answer.text() };
}

describe('the production server', () => {
  it('serves files of the client folder, built assets cached for a year, HEAD without a body', async () => {
    const icon = await exact('GET', '/favicon.svg?v=1');
    expect(icon.status).toBe(200);
    expect(icon.headers['content-type']).toBe('image/svg+xml');
    expect(icon.headers['cache-control']).toBe('public, max-age=0');
    expect(icon.body).toContain('<svg');
    const head = await exact('HEAD', '/favicon.svg');
    expect(head.status).toBe(200);
    expect(head.headers['content-length']).toBe(String(Buffer.byteLength(icon.body)));
    expect(head.body).toBe('');

    const page = await exact('GET', '/signin');
    const asset = /\/_astro\/[^"'\s)]+\.(?:css|js)/.exec(page.body)?.[0];
    expect(asset).toBeTruthy();
    const built = await exact('GET', asset!);
    expect(built.status).toBe(200);
    expect(built.headers['cache-control']).toBe('public, max-age=31536000, immutable');
  });

  it.each([
    '/../package.json',
    '/_astro/../../package.json',
    '/..%2F..%2Fpackage.json',
    '/%2e%2e/%2e%2e/package.json',
    '/_astro/..%2F..%2Fserver%2Fserve.mjs',
    '/..%2fserver/entry.mjs',
    '/../server/serve.mjs',
    '/.env',
    '/favicon.svg%00',
  ])('serves nothing outside the client folder for %s', async (rawPath) => {
    const res = await exact('GET', rawPath);
    expect(res.status).toBe(404);
    expect(res.headers['content-type']).toBe('text/html');
    expect(res.body).not.toContain('"dependencies"');
    expect(res.body).not.toContain('createRequestListener');
  });

  it('answers a URL that does not decode with a bare 400', async () => {
    const res = await exact('GET', '/%E0%A4%A');
    expect(res.status).toBe(400);
    expect(res.body).toBe('Bad request.');
  });

  it('hands HEAD and OPTIONS on pages and the API to the app', async () => {
    const health = await exact('HEAD', '/api/health');
    expect(health.status).toBe(200);
    expect(health.headers['content-type']).toBe('application/json');
    expect(health.headers['x-frame-options']).toBe('DENY');
    expect(health.body).toBe('');
    const options = await exact('OPTIONS', '/api/health');
    expect(options.status).toBe(404);
    expect(options.headers['content-type']).toBe('application/problem+json');
    const page = await exact('HEAD', '/signin');
    expect(page.status).toBe(200);
    expect(page.headers['content-type']).toBe('text/html');
    expect(page.body).toBe('');
  });
});
