import type { APIRoute } from 'astro';
import { z } from 'zod';
import { auditReaders } from '@/lib/server/archive-access';
import { listAuditEvents } from '@/lib/server/audit-trail';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseQuery } from '@/lib/server/http/problem';

const QuerySchema = z.strictObject({
  before: z.coerce.number().int().min(1).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
  action: z.string().trim().max(100).optional(),
  entityId: z.string().trim().max(100).optional(),
});

/** The organisation's audit events, newest first, paged with `before` (an event id). Owner only. */
export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { organisation } = requireRole(locals, ...auditReaders);
  return Response.json(await listAuditEvents(organisation.id, parseQuery(QuerySchema, url)));
});
