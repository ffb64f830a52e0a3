import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { gateHistoryReaders } from '@/lib/server/archive-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle } from '@/lib/server/http/problem';
import { calendarOf } from '@/lib/server/ics';
import { reinspectionOfGate } from '@/lib/server/reinspection';
import { dueEventOf } from '@/lib/server/reinspection-reminders';

/** The gate's re-inspection due date as an iCalendar file; 404 when it has none yet. */
export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { organisation } = requireRole(locals, ...gateHistoryReaders);
  const id = idFromPath(params.id);
  const due = found(id ? await reinspectionOfGate(organisation.id, id) : null, 'A re-inspection date for that gate');
  const body = calendarOf([dueEventOf(due, organisation.name)], `${organisation.name}: re-inspection`);
  return new Response(body, {
    headers: { 'content-type': 'text/calendar; charset=utf-8', 'content-disposition': `attachment; filename="reinspection-${due.dueOn}.ics"` },
  });
});
