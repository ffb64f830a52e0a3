import type { APIRoute } from 'astro';
import { ArchiveListQuerySchema } from '@/lib/api/archive';
import { listArchive } from '@/lib/server/archive';
import { archiveReaders } from '@/lib/server/archive-access';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseQuery } from '@/lib/server/http/problem';

/** One page of the archive: filtered, sorted, keyset-paged (`after` / `before` cursors). */
export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { organisation } = requireRole(locals, ...archiveReaders);
  return Response.json(
    await listArchive(organisation.id, organisation.timeZone, parseQuery(ArchiveListQuerySchema, url)),
  );
});
