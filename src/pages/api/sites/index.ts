import { clientAddressOf } from '@/lib/server/auth/client-address';
import type { APIRoute } from 'astro';
import { SiteCreateSchema, SiteListQuerySchema } from '@/lib/api/sites';
import { createSite, listSites } from '@/lib/server/sites';
import { directoryReaders, directoryWriters } from '@/lib/server/domain-access';
import { requireRole } from '@/lib/server/http/guard';
import { withIdempotency } from '@/lib/server/http/idempotency';
import { handle, parseBody, parseQuery } from '@/lib/server/http/problem';

/** The organisation's sites, filtered, sorted and paged (a homeowner sees only their own client's). */
export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { user } = requireRole(locals, ...directoryReaders);
  return Response.json(await listSites(user, parseQuery(SiteListQuerySchema, url)));
});

/** Creates one; an `Idempotency-Key` header makes a retry answer the first response instead of creating again. */
export const POST: APIRoute = handle(async (context) => {
  const { user } = requireRole(context.locals, ...directoryWriters);
  return withIdempotency(user, context.request, async (knex, body) => {
    const created = await createSite(user, await parseBody(SiteCreateSchema, body), knex, {
      ip: clientAddressOf(context),
    });
    return Response.json(created, { status: 201, headers: { location: `/api/sites/${created.id}` } });
  });
});
