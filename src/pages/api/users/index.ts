/** GET /api/users?role=&active=&sort=&page=&pageSize=: the organisation's people (owner, office). */
import type { APIRoute } from 'astro';
import { UserListQuerySchema } from '@/lib/api/users';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseQuery } from '@/lib/server/http/problem';
import { listUsers } from '@/lib/server/users';

export const GET: APIRoute = handle(async ({ locals, url }) => {
  const { organisation } = requireRole(locals, 'owner', 'office');
  const query = parseQuery(UserListQuerySchema, url);
  return Response.json(await listUsers(organisation.id, query));
});
