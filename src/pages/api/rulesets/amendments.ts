import type { APIRoute } from 'astro';
import { AmendmentCreateSchema } from '@/lib/api/rulesets';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseBody } from '@/lib/server/http/problem';
import { deriveAmendment } from '@/lib/server/ruleset-amendments';

/** Owner: a draft copy of a published version in the organisation's own family, ready to amend. */
export const POST: APIRoute = handle(async (context) => {
  const session = requireRole(context.locals, 'owner');
  const input = await parseBody(AmendmentCreateSchema, context.request);
  const created = await deriveAmendment(session, input, { ip: clientAddressOf(context) });
  const location = `/api/rulesets/${created.family}/${created.version}`;
  return Response.json(created, { status: 201, headers: { location } });
});
