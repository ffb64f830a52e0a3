import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { assessmentWorkers } from '@/lib/server/domain-access';
import { removeTrace } from '@/lib/server/force-traces';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, HttpProblem } from '@/lib/server/http/problem';

const what = 'That force trace';

/** Removes a force trace from a draft. */
export const DELETE: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireRole(locals, ...assessmentWorkers);
  const assessmentId = found(idFromPath(params.id), what);
  const traceId = found(idFromPath(params.traceId), what);
  if (!(await removeTrace(user, assessmentId, traceId))) throw new HttpProblem(404, `${what} was not found.`);
  return new Response(null, { status: 204 });
});
