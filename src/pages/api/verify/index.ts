import type { APIRoute } from 'astro';
import { z } from 'zod';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import {
  admitVerification,
  referenceOf,
  sha256Of,
  streamedSha256,
  verificationWaitMessage,
  verifyDocument,
} from '@/lib/server/document-verification';
import { readMultipart } from '@/lib/server/http/multipart';
import { handle, HttpProblem, parseQuery, problem } from '@/lib/server/http/problem';

/** Signed reports are a few MB; anything far larger is not one of ours. */
const MAX_PDF_BYTES = 30 * 1024 * 1024;

const QuerySchema = z.strictObject({
  document: z
    .string()
    .trim()
    .max(100)
    .refine((v) => referenceOf(v) !== null, 'must be a document id (UUID) or a SHA-256 (64 hex digits)'),
});

const tooLarge = () =>
  new HttpProblem(413, `A signed report is never larger than ${MAX_PDF_BYTES / 1024 / 1024} MB.`, {
    errors: [{ field: 'file', message: `must be at most ${MAX_PDF_BYTES / 1024 / 1024} MB` }],
    limitBytes: MAX_PDF_BYTES,
  });

/** 429 with Retry-After when this address has checked too many reports lately (before any upload is read). */
async function throttled(context: { clientAddress: string }): Promise<Response | null> {
  const admission = await admitVerification(clientAddressOf(context));
  if (admission.admitted) return null;
  return problem(
    429,
    verificationWaitMessage(admission.retryAfterSeconds),
    {},
    { 'retry-after': String(admission.retryAfterSeconds) },
  );
}

/** Public: is this document id or SHA-256 an archived signed report? */
export const GET: APIRoute = handle(async (context) => {
  const { document } = parseQuery(QuerySchema, context.url);
  const refused = await throttled(context);
  if (refused) return refused;
  return Response.json(await verifyDocument(referenceOf(document)!));
});

/** Public: is this PDF (multipart field `file`, or the raw body as application/pdf) an archived signed report? */
export const POST: APIRoute = handle(async (context) => {
  const refused = await throttled(context);
  if (refused) return refused;
  const { request } = context;
  const type = request.headers.get('content-type') ?? '';
  if (/^application\/pdf\b/i.test(type)) {
    return Response.json(
      await verifyDocument({ sha256: await streamedSha256(request, MAX_PDF_BYTES, tooLarge) }),
    );
  }
  const form = await readMultipart(request, MAX_PDF_BYTES, tooLarge);
  const file = form.get('file');
  if (!(file instanceof File) || file.size === 0) {
    throw new HttpProblem(422, 'Some fields are missing or invalid.', {
      errors: [{ field: 'file', message: 'choose the PDF to check' }],
    });
  }
  return Response.json(await verifyDocument({ sha256: sha256Of(new Uint8Array(await file.arrayBuffer())) }));
});
