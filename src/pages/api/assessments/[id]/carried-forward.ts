import type { APIRoute } from 'astro';
import { CarriedForwardConfirmSchema } from '@/lib/api/assessments';
import { idFromPath } from '@/lib/api/common';
import { assertEditable, getAssessment } from '@/lib/server/assessments';
import { carriedForwardOf, confirmCarriedForward } from '@/lib/server/assessments';
import { db } from '@/lib/server/db';
import { assessmentWorkers } from '@/lib/server/domain-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, parseBody } from '@/lib/server/http/problem';

const what = 'That assessment';

/** What was carried forward from the last signed visit and what still waits for confirmation. */
export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireRole(locals, ...assessmentWorkers);
  const id = found(idFromPath(params.id), what);
  found(await getAssessment(user, id), what);
  return Response.json(
    (await carriedForwardOf(db(), user.organisationId, id)) ?? { fromAssessmentId: null, pending: [] },
  );
});

/**
 * Confirms carried-forward answers as they are (`{ keys: ["answers.<key>", …] }`); a key not
 * waiting for confirmation is a 422 naming it. The draft's auditor or the office only.
 */
export const POST: APIRoute = handle(async ({ locals, params, request }) => {
  const { user } = requireRole(locals, ...assessmentWorkers);
  const id = found(idFromPath(params.id), what);
  const current = found(await getAssessment(user, id), what);
  assertEditable(user, current, undefined);
  const { keys } = await parseBody(CarriedForwardConfirmSchema, request);
  return Response.json(found(await confirmCarriedForward(db(), user.organisationId, id, keys), what));
});
