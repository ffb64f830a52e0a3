import type { APIRoute } from 'astro';
import { ArchiveFilterSchema } from '@/lib/api/archive';
import { archiveReaders } from '@/lib/server/archive-access';
import { exportSignedReports } from '@/lib/server/archive-export';
import { recordAudit } from '@/lib/server/audit';
import { recordAnchor } from '@/lib/server/audit-anchors';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { db } from '@/lib/server/db';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseQuery } from '@/lib/server/http/problem';

/** The signed PDFs the filter matches and an index.csv, as one streamed ZIP. Audited. */
export const GET: APIRoute = handle(async (context) => {
  const { locals, url } = context;
  const { user, organisation } = requireRole(locals, ...archiveReaders);
  const filter = parseQuery(ArchiveFilterSchema, url);
  const ip = clientAddressOf(context);
  // The export's own event is the chain head it carries (and records as an anchor).
  const auditHead = await db().transaction(async (trx) => {
    const event = await recordAudit(trx, {
      organisationId: organisation.id,
      actorUserId: user.id,
      actorLabel: user.email,
      action: 'archive.exported',
      entityType: 'organisation',
      entityId: organisation.id,
      ip,
      detail: { filter: Object.fromEntries(Object.entries(filter).filter(([, v]) => v !== undefined)) },
    });
    const head = { eventId: event.id, hash: event.hash };
    await recordAnchor(trx, head, {
      organisationId: organisation.id,
      kind: 'archive_export',
      reference: String(event.id),
    });
    return head;
  });
  const { stream, filename } = await exportSignedReports(
    organisation.id,
    organisation.timeZone,
    filter,
    undefined,
    {
      auditHead,
      actor: { userId: user.id, label: user.email, ip },
    },
  );
  return new Response(stream, {
    status: 200,
    headers: {
      'content-type': 'application/zip',
      'content-disposition': `attachment; filename="${filename}"`,
      'cache-control': 'private, no-store',
    },
  });
});
