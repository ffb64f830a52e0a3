/**
 * GET /api/users/{id} (owner, office) and PATCH /api/users/{id} (owner: role, active, name).
 * Another organisation's id is simply not found.
 */
import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { UserPatchSchema } from '@/lib/api/users';
import { actorOf } from '@/lib/server/http/actor';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, parseBody } from '@/lib/server/http/problem';
import { getUser, updateUser } from '@/lib/server/users';

export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { organisation } = requireRole(locals, 'owner', 'office');
  const id = idFromPath(params.id);
  return Response.json(found(id && (await getUser(organisation.id, id)), 'That person'));
});

export const PATCH: APIRoute = handle(async (context) => {
  const { user, organisation } = requireRole(context.locals, 'owner');
  const id = found(idFromPath(context.params.id), 'That person');
  const patch = await parseBody(UserPatchSchema, context.request);
  return Response.json(
    found(await updateUser(organisation.id, id, patch, actorOf(user, context)), 'That person'),
  );
});
