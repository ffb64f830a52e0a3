import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { getAssessment } from '@/lib/server/assessments';
import { db } from '@/lib/server/db';
import { documentsOfAssessment } from '@/lib/server/documents';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle } from '@/lib/server/http/problem';
import { messagesAbout } from '@/lib/server/outbox';
import { signingStatus } from '@/lib/server/signing';

/**
 * Where an assessment stands on its way to a signature (staff): its links (never the tokens),
 * the signature record, its documents, and every e-mail about it with its delivery state
 * (`queued` while SMTP is unreachable, with the next attempt's time).
 */
export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireRole(locals, 'owner', 'office', 'auditor');
  const id = found(idFromPath(params.id), 'That assessment');
  const assessment = found(await getAssessment(user, id), 'That assessment');
  const knex = db();
  const [status, documents, messages] = await Promise.all([
    signingStatus(knex, user.organisationId, id),
    documentsOfAssessment(knex, user.organisationId, id),
    messagesAbout(knex, user.organisationId, 'assessment', id),
  ]);
  return Response.json({ assessmentId: id, status: assessment.status, ...status, documents, messages });
});
