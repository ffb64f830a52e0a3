import type { APIRoute } from 'astro';
import { documentBytes } from '@/lib/server/documents';
import { handle } from '@/lib/server/http/problem';
import { linkProblem, signingCopyForLink } from '@/lib/server/signing';

/** The exact PDF the signer is asked to sign (public: the link is the credential). */
export const GET: APIRoute = handle(async ({ params }) => {
  const copy = await signingCopyForLink(params.token ?? '');
  if (copy.state !== 'ok') throw linkProblem(copy.state);
  return new Response(new Uint8Array(await documentBytes(copy.document)), {
    headers: {
      'content-type': 'application/pdf',
      'content-disposition': `inline; filename="${copy.document.filename}"`,
      'cache-control': 'private, no-store',
      'x-document-sha256': copy.document.sha256,
      'referrer-policy': 'no-referrer',
    },
  });
});
