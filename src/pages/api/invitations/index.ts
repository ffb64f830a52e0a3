/**
 * POST /api/invitations {"email","role"} (owner): invites a staff member by e-mail.
 * GET /api/invitations (owner): the invitations still open.
 */
import type { APIRoute } from 'astro';
import { InvitationCreateSchema } from '@/lib/api/users';
import { actorOf } from '@/lib/server/http/actor';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseBody } from '@/lib/server/http/problem';
import { inviteStaff, listOpenInvitations } from '@/lib/server/invitations';

export const GET: APIRoute = handle(async ({ locals }) => {
  const { organisation } = requireRole(locals, 'owner');
  return Response.json({ items: await listOpenInvitations(organisation.id) });
});

export const POST: APIRoute = handle(async (context) => {
  const { user, organisation } = requireRole(context.locals, 'owner');
  const input = await parseBody(InvitationCreateSchema, context.request);
  const invitation = await inviteStaff(organisation.id, input, actorOf(user, context));
  return Response.json(invitation, { status: 201 });
});
