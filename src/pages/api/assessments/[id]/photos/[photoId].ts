import type { APIRoute } from 'astro';
import { Readable } from 'node:stream';
import { idFromPath } from '@/lib/api/common';
import { assessmentReaders, assessmentWorkers } from '@/lib/server/domain-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, HttpProblem } from '@/lib/server/http/problem';
import { photoFile, removePhoto, type PhotoSize } from '@/lib/server/photos';
import { storage } from '@/lib/server/storage';

const what = 'That photo';
const sizes: readonly PhotoSize[] = ['thumb', 'display', 'original'];

/**
 * One photo's bytes: `?size=thumb` (walk-through strip), `display` (default; report) or
 * `original`. Content-addressed, so the ETag is the SHA-256 and the response never changes.
 */
export const GET: APIRoute = handle(async ({ locals, params, url, request }) => {
  const { user } = requireRole(locals, ...assessmentReaders);
  const assessmentId = found(idFromPath(params.id), what);
  const photoId = found(idFromPath(params.photoId), what);
  const size = (url.searchParams.get('size') ?? 'display') as PhotoSize;
  if (!sizes.includes(size))
    throw new HttpProblem(400, 'size must be thumb, display or original.', {
      errors: [{ field: 'size', message: 'must be one of: thumb, display, original' }],
    });
  const file = found(await photoFile(user, assessmentId, photoId, size), what);
  const etag = `"${file.key}"`;
  const headers = {
    'content-type': file.contentType,
    etag,
    'cache-control': 'private, max-age=31536000, immutable',
    'x-content-type-options': 'nosniff',
  };
  if (request.headers.get('if-none-match') === etag) return new Response(null, { status: 304, headers });
  const stream = found(await storage().stream(file.key), what);
  return new Response(Readable.toWeb(stream) as ReadableStream, { headers });
});

/** Removes a photo from a draft. */
export const DELETE: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireRole(locals, ...assessmentWorkers);
  const assessmentId = found(idFromPath(params.id), what);
  const photoId = found(idFromPath(params.photoId), what);
  if (!(await removePhoto(user, assessmentId, photoId))) throw new HttpProblem(404, `${what} was not found.`);
  return new Response(null, { status: 204 });
});
