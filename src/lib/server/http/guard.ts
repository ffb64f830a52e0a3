/**
 * Role checks for endpoints. The middleware already answers 401 for a signed-out caller on
 * /api; handlers call `requireRole` to narrow to the roles that may use them (403 otherwise).
 * Rows of another organisation are never "forbidden": they are simply not found (404).
 */
import type { Role, SessionOrganisation, SessionUser } from '../session-user';
import { HttpProblem } from './problem';

export function requireUser(locals: App.Locals): { user: SessionUser; organisation: SessionOrganisation } {
  if (!locals.user || !locals.organisation) throw new HttpProblem(401, 'Sign in to use this.');
  return { user: locals.user, organisation: locals.organisation };
}

export function requireRole(
  locals: App.Locals,
  ...roles: Role[]
): { user: SessionUser; organisation: SessionOrganisation } {
  const session = requireUser(locals);
  if (!roles.includes(session.user.role)) {
    throw new HttpProblem(403, `This needs one of these roles: ${roles.join(', ')}.`);
  }
  return session;
}

/** 404 for a missing row, including one that belongs to another organisation. */
export function found<T>(row: T | null | undefined, what = 'That record'): T {
  if (row === null || row === undefined) throw new HttpProblem(404, `${what} was not found.`);
  return row;
}
