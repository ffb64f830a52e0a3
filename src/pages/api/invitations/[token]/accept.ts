/**
 * POST /api/invitations/{token}/accept {"name","password"} (public: the token is the
 * credential): creates the invited staff member's account. 404 for a used, revoked, expired
 * or unknown link.
 */
import type { APIRoute } from 'astro';
import { InvitationAcceptSchema } from '@/lib/api/users';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { handle, parseBody } from '@/lib/server/http/problem';
import { acceptInvitation } from '@/lib/server/invitations';

export const POST: APIRoute = handle(async (context) => {
  const input = await parseBody(InvitationAcceptSchema, context.request, 8192);
  const user = await acceptInvitation(context.params.token ?? '', input, clientAddressOf(context));
  return Response.json(user, { status: 201 });
});
