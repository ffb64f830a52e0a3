import type { APIRoute } from 'astro';
import { z } from 'zod';
import { ScoreRequestSchema } from '@/lib/api/rulesets';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseBody } from '@/lib/server/http/problem';
import { scorePreviewJson } from '@/lib/server/rulesets';
import { staffRoles } from '@/lib/server/session-user';

/** The request schema with zod's compiled fast path (an invalid body falls back to the ordinary parser: the same errors). */
const scoreRequest = z.compile(ScoreRequestSchema);

/**
 * A scoring preview: the input scored against the family's current version (the organisation's
 * own family of that name first, else the shipped one) or the named version. Nothing is stored.
 */
export const POST: APIRoute = handle(async ({ locals, request }) => {
  const { user } = requireRole(locals, ...staffRoles);
  // The same bytes and content type as Response.json(result), written faster (see resultJson).
  return new Response(await scorePreviewJson(user, await parseBody(scoreRequest, request)), {
    headers: { 'content-type': 'application/json' },
  });
});
