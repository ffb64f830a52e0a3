import type { APIRoute } from 'astro';
import { ClientPatchSchema } from '@/lib/api/clients';
import { idFromPath } from '@/lib/api/common';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { deleteClient, getClient, updateClient } from '@/lib/server/clients';
import { directoryDeleters, directoryReaders, directoryWriters } from '@/lib/server/domain-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, HttpProblem, parseBody } from '@/lib/server/http/problem';

const what = 'That client';

export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireRole(locals, ...directoryReaders);
  const id = idFromPath(params.id);
  return Response.json(found(id ? await getClient(user, id) : null, what));
});

/**
 * Changes a client. Correcting the contact e-mail moves the homeowner account that used the old
 * address to the new one (audited; that account's sessions end). 409 when the new address is
 * another account's.
 */
export const PATCH: APIRoute = handle(async (context) => {
  const { locals, params, request } = context;
  const { user } = requireRole(locals, ...directoryWriters);
  const id = found(idFromPath(params.id), what);
  const patch = await parseBody(ClientPatchSchema, request);
  return Response.json(found(await updateClient(user, id, patch, { ip: clientAddressOf(context) }), what));
});

/** Removes the client with its sites and gates; 409 while any has an assessment on record. */
export const DELETE: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireRole(locals, ...directoryDeleters);
  const id = found(idFromPath(params.id), what);
  const deleted = await deleteClient(user, id);
  if (!deleted) throw new HttpProblem(404, `${what} was not found.`);
  return new Response(null, { status: 204 });
});
