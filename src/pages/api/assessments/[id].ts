import type { APIRoute } from 'astro';
import { AssessmentPatchSchema } from '@/lib/api/assessments';
import { idFromPath } from '@/lib/api/common';
import { discardAssessment, patchAssessment, readAssessmentJson } from '@/lib/server/assessments';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { assessmentReaders, assessmentWorkers } from '@/lib/server/domain-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { etagOf, requireIfMatch } from '@/lib/server/http/row-version';
import { preferenceHeaders, returnPreference } from '@/lib/server/http/prefer';
import { handle, HttpProblem, parseBody } from '@/lib/server/http/problem';

const what = 'That assessment';

/**
 * The assessment with its documents (`getAssessment`'s answer, made as text by `readAssessmentJson`);
 * the ETag is its row version, for If-Match on PATCH.
 */
export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireRole(locals, ...assessmentReaders);
  const id = idFromPath(params.id);
  const read = found(id ? await readAssessmentJson(user, id) : null, what);
  return new Response(read.body, {
    headers: { 'content-type': 'application/json', etag: etagOf(read.rowVersion) },
  });
});

/**
 * Merge-patches a draft's answers, measurements and observations over the row version in If-Match.
 * Answers the assessment as GET shows it; with `Prefer: return=minimal` (the walk-through's
 * autosave) only the new row version and the documents as stored (`SavedDraft`).
 */
export const PATCH: APIRoute = handle(async ({ locals, params, request }) => {
  const { user } = requireRole(locals, ...assessmentWorkers);
  const id = found(idFromPath(params.id), what);
  const expectedVersion = requireIfMatch(request);
  const wanted = returnPreference(request);
  const patch = await parseBody(AssessmentPatchSchema, request);
  const saved = found(
    await patchAssessment(user, id, expectedVersion, patch, wanted === 'minimal' ? 'minimal' : 'full'),
    what,
  );
  return Response.json(saved, { headers: { etag: etagOf(saved.rowVersion), ...preferenceHeaders(wanted) } });
});

/** Discards a draft; anything submitted is kept. */
export const DELETE: APIRoute = handle(async (context) => {
  const { user } = requireRole(context.locals, ...assessmentWorkers);
  const id = found(idFromPath(context.params.id), what);
  if (!(await discardAssessment(user, id, { ip: clientAddressOf(context) })))
    throw new HttpProblem(404, `${what} was not found.`);
  return new Response(null, { status: 204 });
});
