import type { APIRoute } from 'astro';
import { AmendmentPatchSchema } from '@/lib/api/rulesets';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { found, requireRole, requireUser } from '@/lib/server/http/guard';
import { handle, parseBody } from '@/lib/server/http/problem';
import { versionFromPath } from '@/lib/server/http/ruleset-path';
import { amendDraft, deleteDraft } from '@/lib/server/ruleset-amendments';
import { getVersionDetail } from '@/lib/server/rulesets';

const what = 'That ruleset version';

/** The whole version: sources, areas, questions and rules, with its status and content SHA-256 (also the ETag). */
export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireUser(locals);
  const { family, version } = versionFromPath(params);
  const detail = found(await getVersionDetail(user, family, version), what);
  return Response.json(detail, { headers: { etag: `"${detail.contentSha256}"` } });
});

/** Owner, on a draft of their own family: change thresholds, severities, on/off; add or remove local rules. */
export const PATCH: APIRoute = handle(async (context) => {
  const session = requireRole(context.locals, 'owner');
  const { family, version } = versionFromPath(context.params);
  const patch = await parseBody(AmendmentPatchSchema, context.request);
  const detail = await amendDraft(session, family, version, patch, { ip: clientAddressOf(context) });
  return Response.json(detail, { headers: { etag: `"${detail.contentSha256}"` } });
});

/** Owner: throws a draft away. Published versions are kept for the record (409). */
export const DELETE: APIRoute = handle(async (context) => {
  const session = requireRole(context.locals, 'owner');
  const { family, version } = versionFromPath(context.params);
  await deleteDraft(session, family, version, { ip: clientAddressOf(context) });
  return new Response(null, { status: 204 });
});
