import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { GateDuplicateSchema } from '@/lib/api/gates';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { duplicateGate, getGate } from '@/lib/server/gates';
import { directoryWriters } from '@/lib/server/domain-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, parseBody } from '@/lib/server/http/problem';

/**
 * Copies the gate's profile to a new gate on the same site (201 with the new gate). Another
 * organisation's gate is a 404, as an unknown id.
 */
export const POST: APIRoute = handle(async (context) => {
  const { user } = requireRole(context.locals, ...directoryWriters);
  const id = found(idFromPath(context.params.id), 'That gate');
  const body = await parseBody(GateDuplicateSchema, context.request);
  const original = found(await getGate(user, id), 'That gate');
  const label = body.label ?? `${original.label} (copy)`.slice(0, 120);
  const copy = found(await duplicateGate(user, id, label, { ip: clientAddressOf(context) }), 'That gate');
  return Response.json(copy, { status: 201, headers: { location: `/api/gates/${copy.id}` } });
});
