import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { gateHistoryReaders } from '@/lib/server/archive-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { HttpProblem, handle } from '@/lib/server/http/problem';
import { calendarOf } from '@/lib/server/ics';
import { AWAITING_FIXES_WORDS, reinspectionOfGate } from '@/lib/server/reinspection';
import { dueEventOf } from '@/lib/server/reinspection-reminders';

/**
 * The gate's re-inspection due date as an iCalendar file; 404 when it has none yet, 409 when the
 * gate awaits its fixes (withdrawn: re-visit when they are reported, so there is no date to add).
 */
export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { organisation } = requireRole(locals, ...gateHistoryReaders);
  const id = idFromPath(params.id);
  const due = found(
    id ? await reinspectionOfGate(organisation.id, id) : null,
    'A re-inspection date for that gate',
  );
  const event = dueEventOf(due, organisation.name);
  if (!event)
    throw new HttpProblem(
      409,
      `That gate was withdrawn from service and awaits its fixes: ${AWAITING_FIXES_WORDS}, so it has no date for a calendar.`,
    );
  const body = calendarOf([event], `${organisation.name}: re-inspection`);
  return new Response(body, {
    headers: {
      'content-type': 'text/calendar; charset=utf-8',
      'content-disposition': `attachment; filename="reinspection-${event.date}.ics"`,
    },
  });
});
