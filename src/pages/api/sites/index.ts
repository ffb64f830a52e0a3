import type { APIRoute } from 'astro';
import { SiteCreateSchema, SiteListQuerySchema } from '@/lib/api/sites';
import { createSite, listSites } from '@/lib/server/sites';
import { directoryReaders, directoryWriters } from '@/lib/server/domain-access';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseBody, parseQuery } from '@/lib/server/http/problem';

/** The organisation's sites, filtered, sorted and paged (a homeowner sees only their own client's). */
export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { user } = requireRole(locals, ...directoryReaders);
  return Response.json(await listSites(user, parseQuery(SiteListQuerySchema, url)));
});

export const POST: APIRoute = handle(async ({ locals, request }) => {
  const { user } = requireRole(locals, ...directoryWriters);
  const created = await createSite(user, await parseBody(SiteCreateSchema, request));
  return Response.json(created, { status: 201, headers: { location: `/api/sites/${created.id}` } });
});
