import { clientAddressOf } from '@/lib/server/auth/client-address';
import type { APIRoute } from 'astro';
import { ClientCreateSchema, ClientListQuerySchema } from '@/lib/api/clients';
import { createClient, listClients } from '@/lib/server/clients';
import { directoryReaders, directoryWriters } from '@/lib/server/domain-access';
import { requireRole } from '@/lib/server/http/guard';
import { withIdempotency } from '@/lib/server/http/idempotency';
import { handle, parseBody, parseQuery } from '@/lib/server/http/problem';

/** The organisation's clients, filtered, sorted and paged (a homeowner sees only their own client's). */
export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { user } = requireRole(locals, ...directoryReaders);
  return Response.json(await listClients(user, parseQuery(ClientListQuerySchema, url)));
});

/** Creates one; an `Idempotency-Key` header makes a retry answer the first response instead of creating again. */
export const POST: APIRoute = handle(async (context) => {
  const { user } = requireRole(context.locals, ...directoryWriters);
  return withIdempotency(user, context.request, async (knex, body) => {
    const created = await createClient(user, await parseBody(ClientCreateSchema, body), knex, {
      ip: clientAddressOf(context),
    });
    return Response.json(created, { status: 201, headers: { location: `/api/clients/${created.id}` } });
  });
});
