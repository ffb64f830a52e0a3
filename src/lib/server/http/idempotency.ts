/**
 * `Idempotency-Key` on creates: a client that lost the answer to a create sends it again with
 * the same key and gets the first answer back (same status and body, `Idempotent-Replayed:
 * true`) instead of a second row.
 *
 * - Keys belong to one organisation and one user, and are kept for 24 hours.
 * - The same key with another request (method, path, content type or body) is refused with 422
 *   naming the header.
 * - The key's row is inserted in the same transaction as the create, under its primary key:
 *   a concurrent duplicate waits for the first to commit and then answers its stored response;
 *   if the first fails, nothing is stored and the duplicate runs as the first.
 * - Only successful answers are stored; a refused request can be corrected and sent again.
 */
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { db } from '../db';
import type { SessionUser } from '../session-user';
import { HttpProblem, maxJsonBodyBytes } from './problem';
import { readBodyBytes } from './body';

export const idempotencyHeader = 'Idempotency-Key';
export const replayedHeader = 'Idempotent-Replayed';
/** How long a key is remembered. Common practice (a day), no standard. */
export const idempotencyKeyHours = 24;
/** Printable ASCII without spaces, 1 to 255 characters: UUIDs and the like. */
const keyPattern = /^[\x21-\x7e]{1,255}$/;

/** Headers of the first answer a replay repeats. */
const keptHeaders = ['content-type', 'location', 'etag'];

class NotStored extends Error {
  constructor(readonly response: Response) {
    super('not stored');
  }
}

const headerProblem = (status: number, detail: string, message: string) =>
  new HttpProblem(status, detail, { errors: [{ field: idempotencyHeader, message }] });

/** The request's Idempotency-Key, or null when none was sent; 400 naming the header when malformed. */
export function idempotencyKeyOf(request: Request): string | null {
  const key = request.headers.get(idempotencyHeader);
  if (key === null) return null;
  if (!keyPattern.test(key)) {
    throw headerProblem(
      400,
      `The ${idempotencyHeader} header is not usable.`,
      'must be 1 to 255 visible ASCII characters (a UUID is a good choice)',
    );
  }
  return key;
}

interface StoredRow {
  request_sha256: string;
  response_status: number;
  response_headers: Record<string, string>;
  response_body: string;
}

function replay(row: StoredRow): Response {
  return new Response(row.response_body, {
    status: row.response_status,
    headers: { ...row.response_headers, [replayedHeader]: 'true' },
  });
}

/**
 * Runs a create at most once per Idempotency-Key. Without the header, `create` simply runs
 * (with the default connection). With it, `create` gets a transaction to do all its writes in
 * and a copy of the request whose body can still be read.
 */
export async function withIdempotency(
  user: SessionUser,
  request: Request,
  create: (knex: Knex, request: Request) => Promise<Response>,
  limit = maxJsonBodyBytes,
): Promise<Response> {
  const key = idempotencyKeyOf(request);
  if (key === null) return create(db(), request);
  const body = await readBodyBytes(request, limit);
  const url = new URL(request.url);
  const fingerprint = createHash('sha256')
    .update(`${request.method}\n${url.pathname}${url.search}\n${request.headers.get('content-type') ?? ''}\n`)
    .update(body)
    .digest('hex');
  const copy = new Request(request.url, {
    method: request.method,
    headers: request.headers,
    body: body.byteLength ? new Uint8Array(body) : undefined,
  });
  const scope = { organisation_id: user.organisationId, user_id: user.id, key };
  try {
    return await db().transaction(async (trx) => {
      // An expired key is free again; the user's other expired keys go with it.
      await trx('idempotency_keys')
        .where({ organisation_id: user.organisationId, user_id: user.id })
        .andWhere('expires_at', '<=', trx.fn.now())
        .del();
      const claimed = await trx('idempotency_keys')
        .insert({
          ...scope,
          method: request.method,
          path: url.pathname,
          request_sha256: fingerprint,
          response_status: 0,
          expires_at: trx.raw(`now() + make_interval(hours => ?)`, [idempotencyKeyHours]),
        })
        .onConflict(['organisation_id', 'user_id', 'key'])
        .ignore()
        .returning('key');
      if (claimed.length === 0) {
        // Another request holds (or held) this key; the insert above waited for it to commit.
        const row: StoredRow | undefined = await trx('idempotency_keys')
          .where(scope)
          .first('request_sha256', 'response_status', 'response_headers', 'response_body');
        if (!row)
          throw new HttpProblem(
            409,
            `A request with this ${idempotencyHeader} is still being handled; try again shortly.`,
          );
        if (row.request_sha256 !== fingerprint) {
          throw headerProblem(
            422,
            `This ${idempotencyHeader} was already used for a different request.`,
            'was already used with a different request body or path; use a new key for a new request',
          );
        }
        return replay(row);
      }
      const response = await create(trx, copy);
      if (!response.ok) throw new NotStored(response);
      const text = await response.text();
      const headers: Record<string, string> = {};
      for (const name of keptHeaders) {
        const value = response.headers.get(name);
        if (value !== null) headers[name] = value;
      }
      await trx('idempotency_keys')
        .where(scope)
        .update({
          response_status: response.status,
          response_headers: JSON.stringify(headers),
          response_body: text,
        });
      return new Response(text, { status: response.status, headers: response.headers });
    });
  } catch (error) {
    if (error instanceof NotStored) return error.response;
    throw error;
  }
}

/**
 * Photo and force-trace uploads are made idempotent by the device's own id for the file
 * (`clientRef`, unique per assessment in the database), so their `Idempotency-Key` must be
 * that id: the header stands in for a missing `clientRef`, and one that names another file is
 * refused. (Their bodies cannot be fingerprinted: a multipart boundary changes on every retry.)
 */
export function uploadClientRef(
  request: Request,
  bodyRef: string | undefined,
  pattern: RegExp,
): string | null {
  const key = idempotencyKeyOf(request);
  const ref = bodyRef?.toLowerCase() ?? null;
  if (key === null) return ref;
  if (!pattern.test(key))
    throw headerProblem(
      400,
      `The ${idempotencyHeader} of an upload is the device's id for the file.`,
      "must be a UUID (the upload's clientRef)",
    );
  if (ref !== null && ref !== key.toLowerCase()) {
    throw headerProblem(
      422,
      `The ${idempotencyHeader} and clientRef name different files.`,
      'must equal clientRef when both are sent',
    );
  }
  return key.toLowerCase();
}
