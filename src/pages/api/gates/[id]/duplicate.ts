import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { GateDuplicateSchema } from '@/lib/api/gates';
import { duplicateGate, getGate } from '@/lib/server/gates';
import { directoryWriters } from '@/lib/server/domain-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, parseBody } from '@/lib/server/http/problem';

/**
 * Copies the gate's profile to a new gate on the same site (201 with the new gate). Another
 * organisation's gate is a 404, as an unknown id.
 */
export const POST: APIRoute = handle(async ({ locals, params, request }) => {
  const { user } = requireRole(locals, ...directoryWriters);
  const id = found(idFromPath(params.id), 'That gate');
  const body = await parseBody(GateDuplicateSchema, request);
  const original = found(await getGate(user, id), 'That gate');
  const label = body.label ?? `${original.label} (copy)`.slice(0, 120);
  const copy = found(await duplicateGate(user, id, label), 'That gate');
  return Response.json(copy, { status: 201, headers: { location: `/api/gates/${copy.id}` } });
});
