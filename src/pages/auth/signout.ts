/**
 * POST /auth/signout (the navigation's Sign out button): ends this browser's session and
 * returns to the sign-in page. Same-site only (Astro's origin check and the middleware's);
 * GET does nothing, so a link or an image cannot sign anyone out.
 */
import type { APIRoute } from 'astro';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { clearSessionCookies, recordSignOut } from '@/lib/server/auth/sign-out';

export const POST: APIRoute = async (context) => {
  if (context.locals.user) await recordSignOut(context.locals.user.id, clientAddressOf(context));
  clearSessionCookies(context.request.headers.get('cookie'), context.cookies);
  return context.redirect('/signin?signedOut=1', 303);
};
