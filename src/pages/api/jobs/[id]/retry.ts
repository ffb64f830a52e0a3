/**
 * POST /api/jobs/{id}/retry (owner): sends a failed or dead job round again. Another
 * organisation's job is not found (404); a job that has not failed cannot be retried (409).
 */
import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, HttpProblem } from '@/lib/server/http/problem';
import { recordAudit } from '@/lib/server/audit';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { db } from '@/lib/server/db';
import { retryJob } from '@/lib/server/jobs/listing';
import { wakeOutboxWorker } from '@/lib/server/outbox';

export const POST: APIRoute = handle(async (context) => {
  const { user, organisation } = requireRole(context.locals, 'owner');
  const id = found(idFromPath(context.params.id), 'That job');
  const outcome = await retryJob(organisation.id, id);
  if (outcome === 'not_found') found(null, 'That job');
  if (outcome === 'not_retryable') throw new HttpProblem(409, 'Only a failed or dead job can be retried.');
  await db().transaction((trx) =>
    recordAudit(trx, {
      organisationId: organisation.id,
      actorUserId: user.id,
      actorLabel: user.email,
      action: 'job.retried',
      entityType: 'job',
      entityId: id,
      ip: clientAddressOf(context),
      detail: {},
    }),
  );
  wakeOutboxWorker();
  return Response.json({ retried: true }, { status: 202 });
});
