import type { APIRoute } from 'astro';
import { SitePatchSchema } from '@/lib/api/sites';
import { idFromPath } from '@/lib/api/common';
import { deleteSite, getSite, updateSite } from '@/lib/server/sites';
import { directoryDeleters, directoryReaders, directoryWriters } from '@/lib/server/domain-access';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, HttpProblem, parseBody } from '@/lib/server/http/problem';

const what = 'That site';

export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireRole(locals, ...directoryReaders);
  const id = idFromPath(params.id);
  return Response.json(found(id ? await getSite(user, id) : null, what));
});

export const PATCH: APIRoute = handle(async (context) => {
  const { locals, params, request } = context;
  const { user } = requireRole(locals, ...directoryWriters);
  const id = found(idFromPath(params.id), what);
  const patch = await parseBody(SitePatchSchema, request);
  return Response.json(found(await updateSite(user, id, patch, { ip: clientAddressOf(context) }), what));
});

/** Removes the site with its gates; 409 while any has an assessment on record. */
export const DELETE: APIRoute = handle(async (context) => {
  const { locals, params } = context;
  const { user } = requireRole(locals, ...directoryDeleters);
  const id = found(idFromPath(params.id), what);
  const deleted = await deleteSite(user, id, { ip: clientAddressOf(context) });
  if (!deleted) throw new HttpProblem(404, `${what} was not found.`);
  return new Response(null, { status: 204 });
});
