import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { assessmentWorkers } from '@/lib/server/domain-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle } from '@/lib/server/http/problem';
import { reviseAssessment } from '@/lib/server/assessments';

/**
 * Starts a correction of a signed assessment: a new draft copying its answers, photos and
 * traces, linked back through supersedesId; the signed one becomes superseded and stays as it was.
 */
export const POST: APIRoute = handle(async (context) => {
  const { user } = requireRole(context.locals, ...assessmentWorkers);
  const id = found(idFromPath(context.params.id), 'That assessment');
  const revision = await reviseAssessment(user, id, { ip: clientAddressOf(context) });
  return Response.json(
    { id: revision.id, supersedesId: revision.supersedesId, status: 'draft' },
    { status: 201, headers: { location: `/api/assessments/${revision.id}` } },
  );
});
