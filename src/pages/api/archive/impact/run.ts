/**
 * The ruleset impact as a queued run: GET answers the latest run of a version and basis with its
 * progress and what it found so far (`run: null` when none was queued); POST queues a new one
 * (202), split into slices that every server instance takes (src/lib/server/impact-runs.ts).
 */
import type { APIRoute } from 'astro';
import { ImpactQuerySchema } from '@/lib/api/impact';
import { archiveReaders } from '@/lib/server/archive-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, parseBody, parseQuery } from '@/lib/server/http/problem';
import { impactTarget } from '@/lib/server/impact';
import { latestImpactRun, startImpactRun } from '@/lib/server/impact-runs';

export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { organisation } = requireRole(locals, ...archiveReaders);
  const { versionId, basis } = parseQuery(ImpactQuerySchema, url);
  const target = found(await impactTarget(organisation.id, versionId), 'That published ruleset version');
  return Response.json(await latestImpactRun(organisation.id, target, basis));
});

export const POST: APIRoute = handle(async ({ locals, request }) => {
  const { organisation } = requireRole(locals, ...archiveReaders);
  const { versionId, basis } = await parseBody(ImpactQuerySchema, request);
  const target = found(await impactTarget(organisation.id, versionId), 'That published ruleset version');
  await startImpactRun(organisation.id, target, basis, 'requested');
  return Response.json(await latestImpactRun(organisation.id, target, basis), { status: 202 });
});
