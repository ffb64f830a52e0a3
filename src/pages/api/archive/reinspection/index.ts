import type { APIRoute } from 'astro';
import { z } from 'zod';
import { archiveReaders } from '@/lib/server/archive-access';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseQuery } from '@/lib/server/http/problem';
import { DUE_SOON_DAYS, dueGates } from '@/lib/server/reinspection';

const QuerySchema = z.strictObject({
  /** Gates due on or before today + this many days; overdue ones are always included. */
  within: z.coerce
    .number()
    .int()
    .min(0, 'must be 0 or more')
    .max(730, 'must be at most 730')
    .default(DUE_SOON_DAYS),
});

/** Gates overdue or due soon, soonest first. */
export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { organisation } = requireRole(locals, ...archiveReaders);
  const { within } = parseQuery(QuerySchema, url);
  return Response.json({
    within,
    reinspectionMonths: organisation.reinspectionMonths,
    gates: await dueGates(organisation.id, within),
  });
});
