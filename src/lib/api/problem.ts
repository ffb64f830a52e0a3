/**
 * The one shape of an error from /api, as the browser reads it: RFC 9457 problem details
 * (`type`, `title`, `status`, `detail`) with `errors: [{ field, message }]` for bad input.
 * Some answers add members of their own (a 409's `current` copy, a signing link's
 * `linkState`); they stay on the object. Status 0 means no answer reached the browser.
 */
import type { Assessment } from './assessments';

export interface FieldProblem {
  field: string;
  message: string;
}

export interface Problem {
  type?: string;
  title?: string;
  status: number;
  detail?: string;
  errors: FieldProblem[];
  /** A 409 from an assessment carries the server's current copy. */
  current?: Assessment;
  [member: string]: unknown;
}

/** What an island says when the server could not be reached. */
export const NO_CONNECTION = 'No connection to the server. Try again when you have signal.';

/** A problem from an answer's status and body, whatever the body held. */
export function toProblem(status: number, body: unknown): Problem {
  const object =
    body && typeof body === 'object' && !Array.isArray(body) ? (body as Record<string, unknown>) : {};
  const errors = Array.isArray(object.errors)
    ? object.errors.filter(
        (e): e is FieldProblem =>
          !!e && typeof e === 'object' && typeof (e as FieldProblem).message === 'string',
      )
    : [];
  return {
    ...object,
    status,
    errors: errors.map((e) => ({ field: String(e.field ?? ''), message: e.message })),
    ...(typeof object.detail === 'string' ? { detail: object.detail } : {}),
  };
}

/** The problem when no answer came back (network down, or a gateway's error page). */
export function offlineProblem(): Problem {
  return { status: 0, title: 'No connection', detail: NO_CONNECTION, errors: [] };
}

/** One sentence for a message line: the server's detail, else its title, else the status. */
export function problemMessage(problem: Problem, fallback?: string): string {
  if (problem.status === 0) return problem.detail ?? NO_CONNECTION;
  return problem.detail ?? problem.title ?? fallback ?? `The server answered ${problem.status}.`;
}

/** The message for one field, when the server named that field. */
export function fieldProblem(problem: Problem, field: string): string | undefined {
  return problem.errors.find((e) => e.field === field)?.message;
}
