import type { APIRoute } from 'astro';
import { ArchiveFilterSchema } from '@/lib/api/archive';
import { archiveReaders } from '@/lib/server/archive-access';
import { exportSignedReports } from '@/lib/server/archive-export';
import { recordAudit } from '@/lib/server/audit';
import { clientAddressOf } from '@/lib/server/auth/client-address';
import { db } from '@/lib/server/db';
import { requireRole } from '@/lib/server/http/guard';
import { handle, parseQuery } from '@/lib/server/http/problem';

/** The signed PDFs the filter matches and an index.csv, as one streamed ZIP. Audited. */
export const GET: APIRoute = handle(async (context) => {
  const { locals, url } = context;
  const { user, organisation } = requireRole(locals, ...archiveReaders);
  const filter = parseQuery(ArchiveFilterSchema, url);
  await db().transaction((trx) =>
    recordAudit(trx, {
      organisationId: organisation.id,
      actorUserId: user.id,
      actorLabel: user.email,
      action: 'archive.exported',
      entityType: 'organisation',
      entityId: organisation.id,
      ip: clientAddressOf(context),
      detail: { filter: Object.fromEntries(Object.entries(filter).filter(([, v]) => v !== undefined)) },
    }),
  );
  const { stream, filename } = await exportSignedReports(organisation.id, organisation.timeZone, filter);
  return new Response(stream, {
    status: 200,
    headers: { 'content-type': 'application/zip', 'content-disposition': `attachment; filename="${filename}"`, 'cache-control': 'private, no-store' },
  });
});
