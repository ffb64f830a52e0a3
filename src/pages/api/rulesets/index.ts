import type { APIRoute } from 'astro';
import { requireUser } from '@/lib/server/http/guard';
import { handle } from '@/lib/server/http/problem';
import { listVisibleFamilies } from '@/lib/server/rulesets';

/** The shipped families and the organisation's own, each with its versions. */
export const GET: APIRoute = handle(async ({ locals }) => {
  const { user } = requireUser(locals);
  return Response.json({ families: await listVisibleFamilies(user) });
});
