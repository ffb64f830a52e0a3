/**
 * POST /api/auth/email-link {"email"}: e-mails a homeowner or property manager a one-time
 * sign-in link. Always 202 for a well-formed address, known or not (no account probing);
 * 429 with Retry-After when asked too often.
 */
import type { APIRoute } from 'astro';
import { z } from 'zod';
import { EmailSchema } from '@/lib/api/users';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { requestSignInLink } from '@/lib/server/auth/email-links';
import { waitInWords } from '@/lib/server/auth/throttle';
import { handle, parseBody, problem } from '@/lib/server/http/problem';

export const prerender = false;

const EmailLinkRequestSchema = z.strictObject({ email: EmailSchema });

export const POST: APIRoute = handle(async (context) => {
  const { email } = await parseBody(EmailLinkRequestSchema, context.request, 4096);
  const result = await requestSignInLink(email, clientAddressOf(context));
  if (result.outcome === 'throttled') {
    return problem(
      429,
      `Too many sign-in links asked for. Try again in ${waitInWords(result.retryAfterSeconds)}.`,
      {},
      { 'retry-after': String(result.retryAfterSeconds) },
    );
  }
  return Response.json(
    {
      detail:
        'If this address belongs to a homeowner or property manager we work for, a sign-in link is on its way.',
    },
    { status: 202 },
  );
});
