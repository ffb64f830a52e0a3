/** GET /api/jobs (owner): the organisation's queued, running, failed and dead background jobs. */
import type { APIRoute } from 'astro';
import { requireRole } from '@/lib/server/http/guard';
import { handle } from '@/lib/server/http/problem';
import { listJobs } from '@/lib/server/jobs/listing';

export const GET: APIRoute = handle(async ({ locals }) => {
  const { organisation } = requireRole(locals, 'owner');
  return Response.json(await listJobs(organisation.id));
});
