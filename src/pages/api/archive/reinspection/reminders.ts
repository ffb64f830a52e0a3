import type { APIRoute } from 'astro';
import { archiveReaders } from '@/lib/server/archive-access';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { requireRole } from '@/lib/server/http/guard';
import { handle } from '@/lib/server/http/problem';
import { queueReinspectionReminders } from '@/lib/server/reinspection-reminders';

/** Queues reminder e-mails for gates due or overdue that have not had one for their due date. */
export const POST: APIRoute = handle(async (context) => {
  const { user, organisation } = requireRole(context.locals, ...archiveReaders);
  const outcome = await queueReinspectionReminders(organisation, {
    userId: user.id,
    label: user.email,
    ip: clientAddressOf(context),
  });
  return Response.json(outcome, { status: 202 });
});
