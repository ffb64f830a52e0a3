import type { APIRoute } from 'astro';
import { auditReaders } from '@/lib/server/archive-access';
import { verifyOrganisationTrail } from '@/lib/server/audit-trail';
import { requireRole } from '@/lib/server/http/guard';
import { handle } from '@/lib/server/http/problem';

/** Verifies the hash chain and points at the organisation's first broken event. Owner only. */
export const GET: APIRoute = handle(async ({ locals }) => {
  const { organisation } = requireRole(locals, ...auditReaders);
  return Response.json(await verifyOrganisationTrail(organisation.id));
});
