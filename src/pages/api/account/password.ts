/**
 * POST /api/account/password {currentPassword, newPassword}: a staff member changes their own
 * password (new one at least 10 characters). Every other session of theirs ends; this one goes
 * on with a re-issued cookie. 422 naming the field for a wrong current password or a short
 * new one; 429 with Retry-After after too many wrong ones.
 */
import type { APIRoute } from 'astro';
import { PasswordChangeSchema } from '@/lib/api/users';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { changePassword } from '@/lib/server/auth/password-change';
import { readSession, reissueSessionCookie } from '@/lib/server/auth/session';
import { requireRole } from '@/lib/server/http/guard';
import { handle, HttpProblem, parseBody } from '@/lib/server/http/problem';
import { staffRoles } from '@/lib/server/session-user';

export const POST: APIRoute = handle(async (context) => {
  const { user } = requireRole(context.locals, ...staffRoles);
  const input = await parseBody(PasswordChangeSchema, context.request);
  const session = await readSession(context.request);
  if (session.state !== 'active') throw new HttpProblem(401, 'Sign in to use this.');
  const sessionVersion = await changePassword(user, input, clientAddressOf(context));
  await reissueSessionCookie(session.session, sessionVersion, context.cookies);
  return new Response(null, { status: 204 });
});
