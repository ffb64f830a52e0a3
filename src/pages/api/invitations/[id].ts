/** DELETE /api/invitations/{id} (owner): withdraws an open invitation; its link stops working. */
import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { actorOf } from '@/lib/server/http/actor';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle } from '@/lib/server/http/problem';
import { revokeInvitation } from '@/lib/server/invitations';

export const DELETE: APIRoute = handle(async (context) => {
  const { user, organisation } = requireRole(context.locals, 'owner');
  const id = found(idFromPath(context.params.id), 'That invitation');
  found(
    (await revokeInvitation(organisation.id, id, actorOf(user, context))) || null,
    'That open invitation',
  );
  return new Response(null, { status: 204 });
});
