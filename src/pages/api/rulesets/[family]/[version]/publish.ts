import type { APIRoute } from 'astro';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { requireRole } from '@/lib/server/http/guard';
import { handle } from '@/lib/server/http/problem';
import { versionFromPath } from '@/lib/server/http/ruleset-path';
import { publishDraft } from '@/lib/server/ruleset-amendments';

/** Owner: publishes a draft of their own family. From then on it never changes. */
export const POST: APIRoute = handle(async (context) => {
  const session = requireRole(context.locals, 'owner');
  const { family, version } = versionFromPath(context.params);
  return Response.json(await publishDraft(session, family, version, { ip: clientAddressOf(context) }));
});
