import type { APIRoute } from 'astro';
import { ImpactQuerySchema } from '@/lib/api/impact';
import { archiveReaders } from '@/lib/server/archive-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, parseQuery } from '@/lib/server/http/problem';
import { impactReport, impactTarget } from '@/lib/server/impact';

/** Re-scores the archive against a published version and lists the gates whose verdict gets worse. */
export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { organisation } = requireRole(locals, ...archiveReaders);
  const { versionId, basis } = parseQuery(ImpactQuerySchema, url);
  const target = found(await impactTarget(organisation.id, versionId), 'That published ruleset version');
  return Response.json(await impactReport(organisation.id, target, basis));
});
