import type { APIRoute } from 'astro';
import { ScoreRequestSchema } from '@/lib/api/rulesets';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseBody } from '@/lib/server/http/problem';
import { scorePreview } from '@/lib/server/rulesets';
import { staffRoles } from '@/lib/server/session-user';

/**
 * A scoring preview: the input scored against the family's current version (the organisation's
 * own family of that name first, else the shipped one) or the named version. Nothing is stored.
 */
export const POST: APIRoute = handle(async ({ locals, request }) => {
  const { user } = requireRole(locals, ...staffRoles);
  return Response.json(await scorePreview(user, await parseBody(ScoreRequestSchema, request)));
});
