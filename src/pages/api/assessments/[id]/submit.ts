import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { submitAssessment } from '@/lib/server/assessments';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { assessmentWorkers } from '@/lib/server/domain-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { etagOf, ifMatchVersion } from '@/lib/server/http/row-version';
import { handle } from '@/lib/server/http/problem';

/**
 * Scores a draft with its pinned ruleset version and stores the result; a draft only. If-Match
 * is optional here: when sent, the submit only goes ahead over that row version.
 */
export const POST: APIRoute = handle(async (context) => {
  const { user } = requireRole(context.locals, ...assessmentWorkers);
  const id = found(idFromPath(context.params.id), 'That assessment');
  const scored = found(
    await submitAssessment(user, id, ifMatchVersion(context.request), { ip: clientAddressOf(context) }),
    'That assessment',
  );
  return Response.json(scored, { headers: { etag: etagOf(scored.rowVersion) } });
});
