import type { APIRoute } from 'astro';
import { fetchCaughtAttachment, getCaughtMessage } from '@/lib/server/mail/caught';

/** Owner-only download of one attachment of a caught message of the owner's organisation. */
export const GET: APIRoute = async ({ params, locals }) => {
  if (locals.user?.role !== 'owner') return new Response('Not found', { status: 404 });
  const index = Number(params.index);
  const message = await getCaughtMessage(params.id ?? '', locals.user.organisationId);
  const attachment = message?.attachments[index];
  const upstream = attachment ? await fetchCaughtAttachment(message!.id, index) : null;
  if (!upstream || !attachment) return new Response('Not found', { status: 404 });
  const filename = (attachment.filename ?? `attachment-${index}`).replace(/[^\w.\- ]/g, '_');
  return new Response(upstream.body, {
    headers: {
      'content-type': attachment.contentType,
      'content-disposition': `attachment; filename="${filename}"`,
    },
  });
};
