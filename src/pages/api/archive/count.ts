import type { APIRoute } from 'astro';
import { ArchiveFilterSchema } from '@/lib/api/archive';
import { countArchive } from '@/lib/server/archive';
import { archiveReaders } from '@/lib/server/archive-access';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseQuery } from '@/lib/server/http/problem';

/** How many assessments a filter matches (asked for separately, so paging stays cheap). */
export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { organisation } = requireRole(locals, ...archiveReaders);
  return Response.json({
    total: await countArchive(organisation.id, organisation.timeZone, parseQuery(ArchiveFilterSchema, url)),
  });
});
