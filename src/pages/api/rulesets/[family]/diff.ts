import type { APIRoute } from 'astro';
import { RulesetDiffQuerySchema } from '@/lib/api/rulesets';
import { found, requireUser } from '@/lib/server/http/guard';
import { handle, parseQuery } from '@/lib/server/http/problem';
import { familyFromPath } from '@/lib/server/http/ruleset-path';
import { diffVersions } from '@/lib/server/rulesets';

/**
 * Rules and questions added, removed and changed (field by field, old → new) from `from` to `to`.
 * `fromFamily` compares across families: an amendment against the version it was derived from.
 */
export const GET: APIRoute = handle(async ({ locals, params, url }) => {
  const { user } = requireUser(locals);
  const family = familyFromPath(params.family);
  const query = parseQuery(RulesetDiffQuerySchema, url);
  const compared = found(await diffVersions(user, family, query), 'One of those ruleset versions');
  return Response.json(compared.diff);
});
