import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { assessmentReaders } from '@/lib/server/domain-access';
import { documentBytes, getDocument } from '@/lib/server/documents';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle } from '@/lib/server/http/problem';

/** The document's bytes, checked against its recorded SHA-256 on the way out. Never changes: immutable caching. */
export const GET: APIRoute = handle(async ({ locals, params, request }) => {
  const { user } = requireRole(locals, ...assessmentReaders);
  const document = found(
    await getDocument(user, found(idFromPath(params.id), 'That document')),
    'That document',
  );
  const etag = `"${document.sha256}"`;
  const headers = {
    'content-type': document.contentType,
    'content-disposition': `inline; filename="${document.filename}"`,
    etag,
    'cache-control': 'private, max-age=31536000, immutable',
    'x-document-sha256': document.sha256,
  };
  if (request.headers.get('if-none-match') === etag) return new Response(null, { status: 304, headers });
  return new Response(new Uint8Array(await documentBytes(document)), { headers });
});
