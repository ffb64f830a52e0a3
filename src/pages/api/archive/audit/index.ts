import type { APIRoute } from 'astro';
import { AuditFilterSchema } from '@/lib/api/audit';
import { auditReaders } from '@/lib/server/archive-access';
import { listAuditEvents } from '@/lib/server/audit-trail';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseQuery } from '@/lib/server/http/problem';

/**
 * The organisation's audit events, newest first, paged with `before` (an event id), searched
 * with `q` and filtered by `action`, `actor`, `from` / `to` (days in the organisation's time
 * zone, inclusive), `entityId` or `gateId`. A bad value is a 400 naming the parameter.
 */
export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { organisation } = requireRole(locals, ...auditReaders);
  const filter = parseQuery(AuditFilterSchema, url);
  return Response.json(
    await listAuditEvents(organisation.id, { ...filter, timeZone: organisation.timeZone }),
  );
});
