/**
 * POST /auth/signout (the navigation's Sign out button): ends this browser's session (its id
 * is revoked on the server, so a copy of the cookie stops working too) and returns to the
 * sign-in page. Same-site only (the middleware's origin check); GET does nothing, so a link or
 * an image cannot sign anyone out.
 */
import type { APIRoute } from 'astro';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { readSession } from '@/lib/server/auth/session';
import { clearSessionCookies, recordSignOut } from '@/lib/server/auth/sign-out';

export const POST: APIRoute = async (context) => {
  const session = await readSession(context.request);
  if (session.state === 'active') {
    await recordSignOut(session.user.id, clientAddressOf(context), {
      id: session.session.id,
      expiresAt: session.session.expiresAt,
    });
  }
  clearSessionCookies(context.request.headers.get('cookie'), context.cookies);
  return context.redirect('/signin?signedOut=1', 303);
};
