import type { APIRoute } from 'astro';
import { idFromPath } from '@/lib/api/common';
import { getAssessment } from '@/lib/server/assessments';
import { assessmentReaders } from '@/lib/server/domain-access';
import { documentBytes, latestDocument } from '@/lib/server/documents';
import { db } from '@/lib/server/db';
import { found, requireRole } from '@/lib/server/http/guard';
import { handle } from '@/lib/server/http/problem';
import { renderAssessmentReport } from '@/lib/server/reports';

const pdfHeaders = (filename: string, extra: Record<string, string> = {}) => ({
  'content-type': 'application/pdf',
  'content-disposition': `inline; filename="${filename}"`,
  'cache-control': 'private, no-store',
  ...extra,
});

/**
 * The report of an assessment (staff of the organisation; the homeowner of its client once it
 * was sent to them). Scored: a preview rendered now from the stored result. Awaiting signature:
 * the copy the signer sees. Signed or superseded: the archived, digitally signed document.
 */
export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireRole(locals, ...assessmentReaders);
  const id = found(idFromPath(params.id), 'That assessment');
  const assessment = found(await getAssessment(user, id), 'That assessment');
  const archivedKind =
    assessment.status === 'signed' || assessment.status === 'superseded'
      ? 'signed_report'
      : assessment.status === 'awaiting_signature'
        ? 'signing_copy'
        : null;
  if (archivedKind) {
    const document = await latestDocument(db(), id, archivedKind);
    if (document) {
      return new Response(new Uint8Array(await documentBytes(document)), {
        headers: pdfHeaders(document.filename, {
          etag: `"${document.sha256}"`,
          'x-document-id': document.id,
          'x-document-sha256': document.sha256,
        }),
      });
    }
  }
  // A draft is a ReportNotReady (409); a damaged record a CorruptRecordError (500): both mapped by handle().
  const pdf = found(
    await renderAssessmentReport(user.organisationId, id, {
      kind: 'preview',
      documentId: 'preview (not archived)',
    }),
    'That assessment',
  );
  return new Response(new Uint8Array(pdf), {
    headers: pdfHeaders(`gate-report-${id.slice(0, 8)}-preview.pdf`),
  });
});
