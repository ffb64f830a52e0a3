/**
 * Request bodies are read only through src/lib/server/http/body.ts (and parseBody, which uses
 * it), so every route states its limit and an oversize body is refused while it streams.
 * The first test reads the sources, so the next route cannot forget.
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import {
  bodyTooLarge,
  boundedRequest,
  consumeBody,
  readBodyBytes,
  readFormBody,
  readPageForm,
} from '@/lib/server/http/body';
import { HttpProblem, parseBody } from '@/lib/server/http/problem';
import { z } from 'zod';

const srcDir = path.resolve(__dirname, '../../../src');
const reader = path.join(srcDir, 'lib/server/http/body.ts');

function sourceFiles(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) return sourceFiles(full);
    return /\.(ts|tsx|astro|mjs|js)$/.test(entry.name) ? [full] : [];
  });
}

/** A request (or `Astro.request`, `context.request`, a clone of one) having its body read directly. */
const directRead =
  /\brequest\s*(?:\.\s*clone\s*\(\s*\))?\s*\.\s*(?:json|formData|arrayBuffer|text|blob|bytes)\s*\(|\brequest\s*\??\.\s*body\b/;

describe('who reads request bodies', () => {
  it('no route, page or server module reads a request body except through body.ts', () => {
    const offenders = sourceFiles(srcDir)
      .filter((file) => file !== reader)
      .flatMap((file) =>
        fs
          .readFileSync(file, 'utf8')
          .split('\n')
          .map((line, i) => ({ line, at: `${path.relative(srcDir, file)}:${i + 1}` }))
          .filter(({ line }) => directRead.test(line))
          .map(({ at, line }) => `${at}: ${line.trim()}`),
      );
    expect(offenders).toEqual([]);
  });

  it('the pattern catches the forms a route would use', () => {
    for (const line of [
      'const form = await Astro.request.formData();',
      'const body = await request.text();',
      'const bytes = Buffer.from(await context.request.arrayBuffer());',
      'const data = await request.json()',
      'const copy = await request.clone().text();',
      'const reader = request.body.getReader();',
      'for await (const chunk of request.body) {}',
    ]) {
      expect(directRead.test(line), line).toBe(true);
    }
    expect(directRead.test('return Response.json(await res.json());')).toBe(false);
    expect(directRead.test('bytes: Buffer.from(await file.arrayBuffer()),')).toBe(false);
  });
});

/** A chunked request (no Content-Length) whose body is `total` bytes in 64 KiB chunks; counts what was pulled. */
function streamed(total: number, headers: Record<string, string> = {}) {
  const pulled = { bytes: 0 };
  const chunk = new Uint8Array(64 * 1024).fill(0x61);
  const body = new ReadableStream<Uint8Array>({
    pull(controller) {
      if (pulled.bytes >= total) return controller.close();
      const part = chunk.subarray(0, Math.min(chunk.byteLength, total - pulled.bytes));
      pulled.bytes += part.byteLength;
      controller.enqueue(part);
    },
  });
  const request = new Request('http://app.test/x', {
    method: 'POST',
    headers,
    body,
    duplex: 'half',
  } as RequestInit);
  return { request, pulled };
}

async function refusal(promise: Promise<unknown>): Promise<HttpProblem> {
  try {
    await promise;
  } catch (error) {
    if (error instanceof HttpProblem) return error;
    throw error;
  }
  throw new Error('expected a refusal');
}

describe('the bounded body reader', () => {
  it('reads a body of exactly the limit (the limit is inclusive)', async () => {
    const { request } = streamed(1000);
    expect((await readBodyBytes(request, 1000)).byteLength).toBe(1000);
  });

  it('refuses one byte over the limit while streaming, with 413 naming the limit, having kept no more than the limit', async () => {
    const { request, pulled } = streamed(60 * 1024 * 1024);
    let kept = 0;
    let pulledAtRefusal = 0;
    const problem = await refusal(
      consumeBody(
        request,
        256 * 1024,
        (chunk) => (kept += chunk.byteLength),
        (declared) => {
          pulledAtRefusal = pulled.bytes;
          return bodyTooLarge(256 * 1024)(declared);
        },
      ),
    );
    expect(problem.status).toBe(413);
    expect(problem.message).toContain('256 KiB');
    expect(problem.extra.limitBytes).toBe(256 * 1024);
    expect(kept).toBeLessThanOrEqual(256 * 1024);
    // Refused within a chunk or two of the limit, not at the end of 60 MB.
    expect(pulledAtRefusal).toBeLessThan(256 * 1024 + 3 * 64 * 1024);
    const edge = streamed(1001);
    expect((await refusal(readBodyBytes(edge.request, 1000))).status).toBe(413);
  });

  it('refuses an announced Content-Length over the limit before reading anything', async () => {
    const { request, pulled } = streamed(2 * 1024 * 1024, { 'content-length': String(2 * 1024 * 1024) });
    let declared: number | null | undefined;
    let pulledAtRefusal = -1;
    let kept = 0;
    const problem = await refusal(
      consumeBody(
        request,
        1024 * 1024,
        (chunk) => (kept += chunk.byteLength),
        (bytes) => {
          declared = bytes;
          pulledAtRefusal = pulled.bytes;
          return new HttpProblem(413, 'too big');
        },
      ),
    );
    expect(problem.status).toBe(413);
    expect(declared).toBe(2 * 1024 * 1024);
    expect(kept).toBe(0);
    // At most the one chunk a stream fetches ahead on its own.
    expect(pulledAtRefusal).toBeLessThanOrEqual(64 * 1024);
  });

  it('parseBody refuses a chunked JSON body over its limit with 413', async () => {
    const { request } = streamed(300 * 1024, { 'content-type': 'application/json' });
    const problem = await refusal(parseBody(z.unknown(), request));
    expect(problem.status).toBe(413);
    expect(problem.message).toContain('256 KiB');
  });

  it('rebuilds a request of the bounded bytes for code that reads the body itself', async () => {
    const original = new Request('http://app.test/api/auth/callback/credentials', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded', 'x-custom': 'kept' },
      body: 'email=a%40b.test&password=secret',
    });
    const { request, bytes } = await boundedRequest(
      original,
      16 * 1024,
      'https://public.test/api/auth/callback/credentials',
    );
    expect(bytes.toString()).toBe('email=a%40b.test&password=secret');
    expect(request.url).toBe('https://public.test/api/auth/callback/credentials');
    expect(request.headers.get('x-custom')).toBe('kept');
    expect(Object.fromEntries(await request.formData())).toEqual({ email: 'a@b.test', password: 'secret' });
    expect((await refusal(boundedRequest(streamed(17 * 1024).request, 16 * 1024))).status).toBe(413);
  });

  it('reads forms, and answers pages with plain 413 and 415 refusals', async () => {
    const form = await readFormBody(
      new Request('http://app.test/', { method: 'POST', body: new URLSearchParams({ a: '1' }) }),
      1024,
    );
    expect(form.get('a')).toBe('1');
    const big = await readPageForm(
      streamed(70 * 1024, { 'content-type': 'application/x-www-form-urlencoded' }).request,
    );
    expect(big).toBeInstanceOf(Response);
    expect((big as Response).status).toBe(413);
    expect(await (big as Response).text()).toContain('64 KiB');
    const wrongType = await readPageForm(
      new Request('http://app.test/', {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: '{}',
      }),
    );
    expect((wrongType as Response).status).toBe(415);
  });
});
