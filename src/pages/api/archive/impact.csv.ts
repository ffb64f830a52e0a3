import type { APIRoute } from 'astro';
import { ImpactQuerySchema } from '@/lib/api/impact';
import { archiveReaders } from '@/lib/server/archive-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, parseQuery } from '@/lib/server/http/problem';
import { impactCsv, impactTarget } from '@/lib/server/impact';

/** The impact list as CSV, one row per gate whose verdict gets worse, streamed as it is computed. */
export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { organisation } = requireRole(locals, ...archiveReaders);
  const { versionId, basis } = parseQuery(ImpactQuerySchema, url);
  const target = found(await impactTarget(organisation.id, versionId), 'That published ruleset version');
  const filename = `impact-${target.family}-${target.version}.csv`.replace(/[^A-Za-z0-9._-]/g, '_');
  return new Response(impactCsv(organisation.id, target, basis), {
    headers: {
      'content-type': 'text/csv; charset=utf-8',
      'content-disposition': `attachment; filename="${filename}"`,
    },
  });
});
