import type { APIRoute } from 'astro';
import { AssessmentCreateSchema, AssessmentListQuerySchema } from '@/lib/api/assessments';
import { createAssessment, listAssessmentsJson } from '@/lib/server/assessments';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { assessmentReaders, assessmentWorkers } from '@/lib/server/domain-access';
import { requireRole } from '@/lib/server/http/guard';
import { withIdempotency } from '@/lib/server/http/idempotency';
import { etagOf } from '@/lib/server/http/row-version';
import { handle, parseBody, parseQuery } from '@/lib/server/http/problem';

/**
 * Assessments filtered by status, verdict, gate kind, auditor, visit dates, gate, site or client:
 * `listAssessments`' page, as JSON text the database builds (`listAssessmentsJson`).
 */
export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { user, organisation } = requireRole(locals, ...assessmentReaders);
  const body = await listAssessmentsJson(
    user,
    organisation.timeZone,
    parseQuery(AssessmentListQuerySchema, url),
  );
  return new Response(body, { headers: { 'content-type': 'application/json' } });
});

/**
 * Starts a draft on a gate, pinned to the family's current published ruleset version. An
 * `Idempotency-Key` header makes a retry answer the first response instead of a second draft.
 */
export const POST: APIRoute = handle(async (context) => {
  const { user } = requireRole(context.locals, ...assessmentWorkers);
  return withIdempotency(user, context.request, async (knex, request) => {
    const input = await parseBody(AssessmentCreateSchema, request);
    const created = await createAssessment(user, input, { ip: clientAddressOf(context) }, knex);
    return Response.json(created, {
      status: 201,
      headers: { location: `/api/assessments/${created.id}`, etag: etagOf(created.rowVersion) },
    });
  });
});
