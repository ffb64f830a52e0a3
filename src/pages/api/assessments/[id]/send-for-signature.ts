import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle, parseBody } from '@/lib/server/http/problem';
import { SendForSignatureSchema, sendForSignature } from '@/lib/server/signing';

/**
 * Sends a scored assessment to the client's contact for signature: renders and stores the
 * copy they will read, opens a single-use link (default 14 days) and queues the e-mail. Sending
 * again while it awaits a signature replaces the earlier link. Body:
 * `{ "expiresInDays"?: n, "recipient"?: "e-mail" }`; the link goes only to `recipient` when given
 * (stored on the sign request and audited), else to the client's contact e-mail.
 */
export const POST: APIRoute = handle(async (context) => {
  const { user } = requireRole(context.locals, 'owner', 'office', 'auditor');
  const id = found(idFromPath(context.params.id), 'That assessment');
  const hasBody =
    Number(context.request.headers.get('content-length') ?? 0) > 0 ||
    context.request.headers.has('content-type');
  const body = hasBody ? await parseBody(SendForSignatureSchema, context.request) : {};
  const sent = await sendForSignature(user, id, {
    expiresInDays: body.expiresInDays,
    recipient: body.recipient,
    ip: clientAddressOf(context),
    userAgent: context.request.headers.get('user-agent'),
  });
  return Response.json(
    {
      assessmentId: sent.assessmentId,
      status: 'awaiting_signature',
      signRequest: { id: sent.signRequestId, recipient: sent.recipient, expiresAt: sent.expiresAt },
      document: sent.document,
      message: { id: sent.outboxMessageId, status: 'queued' },
    },
    { status: 202 },
  );
});
