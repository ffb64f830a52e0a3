/**
 * GET /api/organisation (staff): the signed-in person's organisation and its settings.
 * PATCH /api/organisation (owner): name, display units, time zone, re-inspection interval,
 * client reminders.
 */
import type { APIRoute } from 'astro';
import { OrganisationPatchSchema } from '@/lib/api/organisation';
import { actorOf } from '@/lib/server/http/actor';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, parseBody } from '@/lib/server/http/problem';
import { getOrganisation, updateOrganisation } from '@/lib/server/organisations';

export const GET: APIRoute = handle(async ({ locals }) => {
  const { organisation } = requireRole(locals, 'owner', 'office', 'auditor');
  return Response.json(found(await getOrganisation(organisation.id), 'The organisation'));
});

export const PATCH: APIRoute = handle(async (context) => {
  const { user, organisation } = requireRole(context.locals, 'owner');
  const patch = await parseBody(OrganisationPatchSchema, context.request);
  return Response.json(
    found(await updateOrganisation(organisation.id, patch, actorOf(user, context)), 'The organisation'),
  );
});
