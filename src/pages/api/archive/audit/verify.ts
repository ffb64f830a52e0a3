import type { APIRoute } from 'astro';
import { z } from 'zod';
import { auditReaders } from '@/lib/server/archive-access';
import { parseAnchor } from '@/lib/server/audit-anchors';
import { verifyOrganisationTrail } from '@/lib/server/audit-trail';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseQuery } from '@/lib/server/http/problem';

const QuerySchema = z.strictObject({
  /** A chain head from a signed report or an export's audit-trail-head.json, as `<event id>:<hash>`. */
  anchor: z
    .string()
    .trim()
    .max(100)
    .refine((v) => parseAnchor(v) !== null, 'must be an event id, a colon and a SHA-256 (64 hex digits)')
    .optional(),
});

/**
 * Verifies the hash chain and points at the organisation's first broken event; reports a trail
 * that ends before an anchored event (recorded, or the `anchor` given). Owner only.
 */
export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { organisation } = requireRole(locals, ...auditReaders);
  const { anchor } = parseQuery(QuerySchema, url);
  return Response.json(
    await verifyOrganisationTrail(organisation.id, undefined, anchor ? [parseAnchor(anchor)!] : []),
  );
});
