/**
 * The one way a request body is read, by API routes and pages alike: every reader takes the
 * route's byte limit, refuses a `Content-Length` over it before reading anything, and counts
 * the bytes as they stream in, refusing (413 problem+json naming the limit) as soon as the
 * count passes the limit, whether the body was announced or sent chunked. A refused body is
 * never held in memory beyond the limit.
 *
 * JSON goes through `parseBody` (problem.ts, 256 KiB unless the route says otherwise).
 * Routes never call `request.json()`, `.formData()`, `.arrayBuffer()`, `.text()` or read
 * `request.body` themselves (tests/unit/server/body-readers.test.ts fails if one does).
 */
import type { TooLargeError } from '../errors';
import { HttpProblem } from './problem';

/**
 * Builds the refusal; `declaredBytes` is the announced Content-Length when that was the reason.
 * A domain module's own refusal (a photo's size in words) is a `TooLargeError`.
 */
export type TooLarge = (declaredBytes: number | null) => HttpProblem | TooLargeError;

/** Forms posted to pages (sign-in, settings, staff, invitations, rulesets): a few short fields. */
export const maxPageFormBytes = 64 * 1024;

/** `256 KiB`, `15 MiB`, `900 bytes`. */
export function describeBytes(bytes: number): string {
  if (bytes >= 1024 * 1024 && bytes % (1024 * 1024) === 0) return `${bytes / (1024 * 1024)} MiB`;
  if (bytes >= 1024 && bytes % 1024 === 0) return `${bytes / 1024} KiB`;
  return `${bytes} bytes`;
}

/** The standard refusal: 413 naming the limit, with the limit in bytes as `limitBytes`. */
export function bodyTooLarge(limit: number): TooLarge {
  return () =>
    new HttpProblem(413, `The body is larger than the limit of ${describeBytes(limit)} for this request.`, {
      errors: [{ field: '', message: `must be at most ${limit} bytes` }],
      limitBytes: limit,
    });
}

/** The announced Content-Length, or null when absent or not a plain number. */
function declaredLength(request: Request): number | null {
  const header = request.headers.get('content-length');
  if (header === null || !/^\s*\d+\s*$/.test(header)) return null;
  return Number(header);
}

/**
 * Streams the body into `onChunk`, refusing it once more than `limit` bytes have come (or
 * were announced). Returns the number of bytes read. The rest of a refused body is never read.
 */
export async function consumeBody(
  request: Request,
  limit: number,
  onChunk: (chunk: Uint8Array) => void,
  tooLarge: TooLarge = bodyTooLarge(limit),
): Promise<number> {
  const declared = declaredLength(request);
  if (declared !== null && declared > limit) throw tooLarge(declared);
  if (!request.body) return 0;
  const reader = request.body.getReader();
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) {
      reader.releaseLock();
      return size;
    }
    size += value.byteLength;
    if (size > limit) {
      // Stop reading, and neither keep nor drain the rest: the answer goes out while the client
      // is still sending, and node closes the connection when the client leaves or after its
      // keep-alive timeout. (Cancelling would reset the connection before the 413 is read.)
      reader.releaseLock();
      throw tooLarge(null);
    }
    onChunk(value);
  }
}

/** The whole body as bytes, at most `limit` of them. */
export async function readBodyBytes(
  request: Request,
  limit: number,
  tooLarge?: TooLarge,
): Promise<Buffer<ArrayBuffer>> {
  const chunks: Uint8Array[] = [];
  const size = await consumeBody(request, limit, (chunk) => chunks.push(chunk), tooLarge);
  return Buffer.concat(chunks, size);
}

/** The whole body as UTF-8 text, at most `limit` bytes. */
export async function readBodyText(request: Request, limit: number, tooLarge?: TooLarge): Promise<string> {
  return (await readBodyBytes(request, limit, tooLarge)).toString('utf8');
}

/**
 * A form body (`application/x-www-form-urlencoded` or `multipart/form-data`), at most `limit`
 * bytes: 415 for another type, 400 when it cannot be parsed.
 */
export async function readFormBody(request: Request, limit: number, tooLarge?: TooLarge): Promise<FormData> {
  const type = request.headers.get('content-type') ?? '';
  if (!/^(multipart\/form-data|application\/x-www-form-urlencoded)\b/i.test(type)) {
    throw new HttpProblem(415, 'Send the form as multipart/form-data or application/x-www-form-urlencoded.', {
      errors: [{ field: '', message: 'Content-Type must be a form' }],
    });
  }
  const bytes = await readBodyBytes(request, limit, tooLarge);
  try {
    return await new Response(bytes, { headers: { 'content-type': type } }).formData();
  } catch {
    throw new HttpProblem(400, 'The form could not be read.', {
      errors: [{ field: '', message: 'Malformed form body' }],
    });
  }
}

/**
 * For pages: the posted form, or a plain-text 413/415/400 answer for the page to return.
 * (`const form = await readPageForm(Astro.request); if (form instanceof Response) return form;`)
 */
export async function readPageForm(request: Request, limit = maxPageFormBytes): Promise<FormData | Response> {
  try {
    return await readFormBody(request, limit);
  } catch (error) {
    if (!(error instanceof HttpProblem)) throw error;
    return new Response(error.message, {
      status: error.status,
      headers: { 'content-type': 'text/plain; charset=utf-8' },
    });
  }
}

/**
 * A copy of the request, addressed to `url` (default: the same URL), whose body is the
 * original's bytes read within `limit`. For code that reads the body itself (auth core).
 */
export async function boundedRequest(
  request: Request,
  limit: number,
  url: string | URL = request.url,
  tooLarge?: TooLarge,
): Promise<{ request: Request; bytes: Buffer<ArrayBuffer> }> {
  const hasBody = request.method !== 'GET' && request.method !== 'HEAD';
  const bytes = hasBody ? await readBodyBytes(request, limit, tooLarge) : Buffer.alloc(0);
  const headers = new Headers(request.headers);
  // The copy's body is complete and of known size: whatever framing the original used is over.
  headers.delete('transfer-encoding');
  headers.delete('content-length');
  return {
    request: new Request(url, { method: request.method, headers, ...(hasBody ? { body: bytes } : {}) }),
    bytes,
  };
}
