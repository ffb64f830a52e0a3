/**
 * The ruleset impact as a queued run: GET answers the latest run of a version and basis with its
 * progress and what it found so far (`run: null` when none was queued); POST queues a new one
 * (202), split into slices that every server instance takes (src/lib/server/impact-runs.ts), or
 * answers the one already queued or running.
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
  // One run of a version and basis at a time: asking again while one is queued or running answers
  // that run, so repeated requests cannot pile whole-archive re-scores onto the queue.
  const current = await latestImpactRun(organisation.id, target, basis);
  if (current.run?.status === 'queued' || current.run?.status === 'running')
    return Response.json(current, { status: 202 });
  await startImpactRun(organisation.id, target, basis, 'requested');
  return Response.json(await latestImpactRun(organisation.id, target, basis), { status: 202 });
});
