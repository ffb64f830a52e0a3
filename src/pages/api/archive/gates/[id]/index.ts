import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { gateHistoryReaders } from '@/lib/server/archive-access';
import { gateHistory } from '@/lib/server/gate-history';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle } from '@/lib/server/http/problem';

/** One gate's assessments over time, its open findings and its re-inspection date. */
export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { organisation } = requireRole(locals, ...gateHistoryReaders);
  const id = idFromPath(params.id);
  return Response.json(found(id ? await gateHistory(organisation.id, id) : null, 'That gate'));
});
