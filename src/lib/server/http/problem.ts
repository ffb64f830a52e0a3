/**
 * RFC 9457 problem details: every API error leaves through here, with per-field messages in
 * `errors` and never a stack trace.
 */
import { STATUS_CODES } from 'node:http';
import { z } from 'zod';
import { CorruptRecordError, DomainError, RateLimitedError } from '../errors';
import { readBodyText } from './body';

export interface FieldError {
  /** Dotted path of the field at fault, e.g. `gate.widthMm`; `''` for the body as a whole. */
  field: string;
  message: string;
}

export interface ProblemBody {
  type: string;
  title: string;
  status: number;
  detail?: string;
  errors?: FieldError[];
  [extension: string]: unknown;
}

/** The statuses this app answers with on purpose, each with its own title. */
const titles = {
  400: 'Bad request',
  401: 'Sign-in required',
  403: 'Not allowed',
  404: 'Not found',
  405: 'Method not allowed',
  409: 'Conflict',
  410: 'Gone',
  413: 'Request too large',
  415: 'Unsupported media type',
  422: 'Invalid input',
  428: 'Precondition required',
  429: 'Too many requests',
  500: 'Server error',
  503: 'Service unavailable',
} as const satisfies Record<number, string>;

export type ProblemStatus = keyof typeof titles;

/** A problem's title: ours for the statuses above, else the status's standard reason phrase. */
export function problemTitle(status: number): string {
  return titles[status as ProblemStatus] ?? STATUS_CODES[status] ?? `HTTP ${status}`;
}

export function problem(
  status: number,
  detail?: string,
  extra: Partial<ProblemBody> & Record<string, unknown> = {},
  headers: HeadersInit = {},
): Response {
  const body: ProblemBody = {
    type: `https://latchwell.invalid/problems/${status}`,
    title: problemTitle(status),
    status,
    ...(detail ? { detail } : {}),
    ...extra,
  };
  return new Response(JSON.stringify(body), {
    status,
    headers: { 'content-type': 'application/problem+json', ...headers },
  });
}

/** Thrown inside handlers to leave early with a problem response. */
export class HttpProblem extends Error {
  constructor(
    readonly status: number,
    detail: string,
    readonly extra: Partial<ProblemBody> & Record<string, unknown> = {},
  ) {
    super(detail);
  }
  toResponse(): Response {
    return problem(this.status, this.message, this.extra);
  }
}

/** One error per field at fault; an object with several unknown fields gives one error for each. */
export function zodFieldErrors(error: z.ZodError): FieldError[] {
  return error.issues.flatMap((issue) => {
    const field = issue.path.map(String).join('.');
    if (issue.code === 'unrecognized_keys') {
      return issue.keys.map((key) => ({
        field: [field, key].filter(Boolean).join('.'),
        message: 'is not a field of this request',
      }));
    }
    return [{ field, message: issue.message }];
  });
}

/** JSON bodies of the domain API. */
export const maxJsonBodyBytes = 256 * 1024;

/**
 * Reads a JSON body (through body.ts, within `limit` bytes) and parses it with a zod schema.
 * Refuses a wrong content type (415), an oversize body (413), malformed JSON (400) and
 * invalid fields (422, each field named).
 */
export async function parseBody<S extends z.ZodType>(
  schema: S,
  request: Request,
  limit = maxJsonBodyBytes,
): Promise<z.infer<S>> {
  const type = request.headers.get('content-type') ?? '';
  if (!/^application\/(merge-patch\+)?json\b/i.test(type)) {
    throw new HttpProblem(415, 'Send the body as application/json.', {
      errors: [{ field: '', message: 'Content-Type must be application/json' }],
    });
  }
  const text = await readBodyText(request, limit);
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch {
    throw new HttpProblem(400, 'The body is not valid JSON.', {
      errors: [{ field: '', message: 'Malformed JSON' }],
    });
  }
  return parseValue(schema, json);
}

export function parseValue<S extends z.ZodType>(schema: S, value: unknown): z.infer<S> {
  const result = schema.safeParse(value);
  if (!result.success) {
    throw new HttpProblem(422, 'Some fields are missing or invalid.', {
      errors: zodFieldErrors(result.error),
    });
  }
  return result.data;
}

/** Parses URL search params (first value of each key) with a zod schema; 400 on failure. */
export function parseQuery<S extends z.ZodType>(schema: S, url: URL): z.infer<S> {
  const raw: Record<string, string> = {};
  for (const [key, value] of url.searchParams) raw[key] ??= value;
  const result = schema.safeParse(raw);
  if (!result.success)
    throw new HttpProblem(400, 'Some query parameters are invalid.', {
      errors: zodFieldErrors(result.error),
    });
  return result.data;
}

/** Wraps an endpoint so thrown HttpProblems become responses and anything else a bare 500. */
export function handle<C>(fn: (context: C) => Promise<Response> | Response) {
  return async (context: C): Promise<Response> => {
    try {
      return await fn(context);
    } catch (error) {
      if (error instanceof HttpProblem) return error.toResponse();
      if (error instanceof DomainError) return domainProblem(error);
      if (isDatabaseUnavailable(error))
        return problem(503, 'The database is unavailable; try again shortly.', {}, { 'retry-after': '5' });
      console.error('[api] unhandled error', error);
      return problem(500, 'Something went wrong on our side.');
    }
  };
}

/** Each kind's status; a status without a title of its own does not type-check here. */
export const domainStatus: Record<DomainError['kind'], ProblemStatus> = {
  not_found: 404,
  conflict: 409,
  invalid_input: 422,
  invalid_query: 400,
  forbidden: 403,
  sign_in_required: 401,
  gone: 410,
  too_large: 413,
  unsupported_type: 415,
  rate_limited: 429,
  corrupt_record: 500,
};

/** What a page shows for a domain error: the status to answer with, the message, per-field errors. */
export interface DomainErrorView {
  status: number;
  message: string;
  errors: FieldError[];
  details: Record<string, unknown>;
  /** Response headers that belong to the answer (Retry-After of a rate limit). */
  headers: Record<string, string>;
}

/**
 * The one mapping from domain errors to statuses and messages: API routes answer it as an
 * RFC 9457 problem (`domainProblem`), Astro pages render it (`pageErrorOf`: a 404 page, a 409
 * message, per-field messages in forms). A corrupt record is logged with its reason and shown
 * as a plain server error.
 */
export function domainErrorView(error: DomainError): DomainErrorView {
  const status = domainStatus[error.kind];
  if (error instanceof CorruptRecordError) {
    console.error('[domain] corrupt record:', error.reason);
    return { status, message: error.message, errors: [], details: {}, headers: {} };
  }
  const headers: Record<string, string> =
    error instanceof RateLimitedError ? { 'retry-after': String(error.retryAfterSeconds) } : {};
  return { status, message: error.message, errors: error.errors, details: error.details, headers };
}

export function domainProblem(error: DomainError): Response {
  const view = domainErrorView(error);
  return problem(
    view.status,
    view.message,
    { ...(view.errors.length ? { errors: view.errors } : {}), ...view.details },
    view.headers,
  );
}

/**
 * For pages: the view of a domain error (or of an HttpProblem thrown by an edge helper such as
 * a body reader); any other error is rethrown — a bug or an outage is not a message for the form.
 */
export function pageErrorOf(error: unknown): DomainErrorView {
  if (error instanceof DomainError) return domainErrorView(error);
  if (error instanceof HttpProblem)
    return {
      status: error.status,
      message: error.message,
      errors: (error.extra.errors as FieldError[] | undefined) ?? [],
      details: {},
      headers: {},
    };
  throw error;
}

/** A view's field errors by field (the first message of each), for a page to put beside its fields. */
export function fieldMessages(view: Pick<DomainErrorView, 'errors'> | null): Record<string, string> {
  const out: Record<string, string> = {};
  for (const e of view?.errors ?? []) out[e.field] ??= e.message;
  return out;
}

/** Connection-level failures (server down, pool exhausted) rather than bad queries. */
export function isDatabaseUnavailable(error: unknown): boolean {
  const e = error as { code?: string; message?: string; name?: string } | null;
  if (!e) return false;
  if (
    e.code &&
    [
      'ECONNREFUSED',
      'ECONNRESET',
      'ETIMEDOUT',
      '57P01',
      '57P02',
      '57P03',
      '08000',
      '08003',
      '08006',
    ].includes(e.code)
  )
    return true;
  return (
    e.name === 'KnexTimeoutError' || /Connection terminated|ECONNREFUSED|connect ECONN/i.test(e.message ?? '')
  );
}
