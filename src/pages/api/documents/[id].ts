import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { assessmentReaders } from '@/lib/server/domain-access';
import { getDocument } from '@/lib/server/documents';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle } from '@/lib/server/http/problem';

/** A document's record: kind, SHA-256, size, and where its bytes are (`/api/documents/{id}/file`). */
export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireRole(locals, ...assessmentReaders);
  const document = found(
    await getDocument(user, found(idFromPath(params.id), 'That document')),
    'That document',
  );
  return Response.json({ ...document, file: `/api/documents/${document.id}/file` });
});
