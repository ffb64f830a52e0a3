import type { APIRoute } from 'astro';
import { fetchCaughtAttachment, getCaughtMessage } from '@/lib/server/mail/caught';

/** Owner-only download of one attachment of a caught message. */
export const GET: APIRoute = async ({ params, locals }) => {
  if (locals.user?.role !== 'owner') return new Response('Not found', { status: 404 });
  const index = Number(params.index);
  const [message, upstream] = await Promise.all([getCaughtMessage(params.id ?? ''), fetchCaughtAttachment(params.id ?? '', index)]);
  const attachment = message?.attachments[index];
  if (!upstream || !attachment) return new Response('Not found', { status: 404 });
  const filename = (attachment.filename ?? `attachment-${index}`).replace(/[^\w.\- ]/g, '_');
  return new Response(upstream.body, {
    headers: { 'content-type': attachment.contentType, 'content-disposition': `attachment; filename="${filename}"` },
  });
};
