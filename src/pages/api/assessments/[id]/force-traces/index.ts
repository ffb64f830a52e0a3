import type { APIRoute } from 'astro';
import { z } from 'zod';
import { idFromPath } from '@/lib/api/common';
import { assessmentReaders, assessmentWorkers } from '@/lib/server/domain-access';
import { addTrace, listTraces } from '@/lib/server/force-traces';
import { readBodyText } from '@/lib/server/http/body';
import { found, requireRole } from '@/lib/server/http/guard';
import { uploadClientRef, replayedHeader } from '@/lib/server/http/idempotency';
import { handle, HttpProblem, parseQuery } from '@/lib/server/http/problem';
import { MAX_TRACE_CSV_BYTES, megabytes, TRACE_LOCATIONS } from '@/lib/api/uploads';
import { CLIENT_REF_PATTERN, ITEM_KEY_PATTERN } from '@/lib/api/uploads';

const what = 'That assessment';

const TraceQuerySchema = z.strictObject({
  itemKey: z.string().regex(ITEM_KEY_PATTERN, 'must be the key of a walk-through item'),
  clientRef: z
    .string()
    .regex(CLIENT_REF_PATTERN, "must be the device's id for the trace (a UUID)")
    .optional(),
  fileName: z.string().trim().max(200, 'must be at most 200 characters').optional(),
  location: z.enum(TRACE_LOCATIONS, `must be one of: ${TRACE_LOCATIONS.join(', ')}`),
  direction: z.enum(['closing', 'opening'], 'must be closing or opening'),
  gapMm: z.coerce
    .number('must be a number')
    .min(0, 'must not be negative')
    .max(10_000, 'must be at most 10000 mm'),
});

export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireRole(locals, ...assessmentReaders);
  const id = found(idFromPath(params.id), what);
  return Response.json(await listTraces(user, id));
});

async function readCsv(request: Request): Promise<string> {
  const type = request.headers.get('content-type') ?? '';
  if (!/^(text\/csv|text\/plain|application\/octet-stream)\b/i.test(type)) {
    throw new HttpProblem(415, 'Send the force meter file as text/csv.', {
      errors: [{ field: 'csv', message: 'Content-Type must be text/csv' }],
    });
  }
  const tooLarge = () =>
    new HttpProblem(
      413,
      `The file is larger than ${megabytes(MAX_TRACE_CSV_BYTES)}; export one measuring point per file.`,
      {
        errors: [{ field: 'csv', message: `must be at most ${megabytes(MAX_TRACE_CSV_BYTES)}` }],
        limitBytes: MAX_TRACE_CSV_BYTES,
      },
    );
  return readBodyText(request, MAX_TRACE_CSV_BYTES, tooLarge);
}

/**
 * Uploads one force-meter CSV (the body) for a measuring point named in the query. 201 with
 * the samples and evaluation; 422 naming the line when the file cannot be read. The same
 * `clientRef` (or `Idempotency-Key`, taken as it) again answers 200 with the first trace.
 */
export const POST: APIRoute = handle(async ({ locals, params, request, url }) => {
  const { user } = requireRole(locals, ...assessmentWorkers);
  const id = found(idFromPath(params.id), what);
  const query = parseQuery(TraceQuerySchema, url);
  const csv = await readCsv(request);
  const { trace, created } = await addTrace(user, id, {
    clientRef: uploadClientRef(request, query.clientRef, CLIENT_REF_PATTERN),
    itemKey: query.itemKey,
    fileName: query.fileName || null,
    location: query.location,
    direction: query.direction,
    gapMm: query.gapMm,
    csv,
  });
  return Response.json(trace, {
    status: created ? 201 : 200,
    headers: created ? {} : { [replayedHeader]: 'true' },
  });
});
