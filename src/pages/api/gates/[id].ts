import type { APIRoute } from 'astro';
import { GatePatchSchema } from '@/lib/api/gates';
import { idFromPath } from '@/lib/api/common';
import { deleteGate, getGate, updateGate } from '@/lib/server/gates';
import { directoryDeleters, directoryReaders, directoryWriters } from '@/lib/server/domain-access';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, HttpProblem, parseBody } from '@/lib/server/http/problem';

const what = 'That gate';

export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireRole(locals, ...directoryReaders);
  const id = idFromPath(params.id);
  return Response.json(found(id ? await getGate(user, id) : null, what));
});

export const PATCH: APIRoute = handle(async (context) => {
  const { locals, params, request } = context;
  const { user } = requireRole(locals, ...directoryWriters);
  const id = found(idFromPath(params.id), what);
  const patch = await parseBody(GatePatchSchema, request);
  return Response.json(found(await updateGate(user, id, patch, { ip: clientAddressOf(context) }), what));
});

/** Removes the gate; 409 while it has an assessment on record. */
export const DELETE: APIRoute = handle(async (context) => {
  const { locals, params } = context;
  const { user } = requireRole(locals, ...directoryDeleters);
  const id = found(idFromPath(params.id), what);
  const deleted = await deleteGate(user, id, { ip: clientAddressOf(context) });
  if (!deleted) throw new HttpProblem(404, `${what} was not found.`);
  return new Response(null, { status: 204 });
});
