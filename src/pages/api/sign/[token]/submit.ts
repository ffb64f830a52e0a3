import type { APIRoute } from 'astro';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { handle, parseBody } from '@/lib/server/http/problem';
import { SIGNATURE_BODY_LIMIT, SignatureSubmitSchema, submitSignature } from '@/lib/server/signing';

/**
 * The owner's signature (public: the link is the credential). Records name, consent, intent,
 * the drawn signature (or the typed name as the mark), each acknowledged caution, time, IP,
 * user agent and the SHA-256 of the PDF shown; then produces the final signed document.
 */
export const POST: APIRoute = handle(async (context) => {
  const body = await parseBody(SignatureSubmitSchema, context.request, SIGNATURE_BODY_LIMIT);
  const signed = await submitSignature(context.params.token ?? '', body, {
    ip: clientAddressOf(context),
    userAgent: context.request.headers.get('user-agent'),
  });
  return Response.json({ status: 'signed', ...signed }, { status: 201 });
});
