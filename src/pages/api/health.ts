import type { APIRoute } from 'astro';
import { pingDatabase } from '@/lib/server/db';
import { mailReachable } from '@/lib/server/mail/transport';
import { appVersion } from '@/lib/server/version';

/** Liveness and dependencies: 200 when the database answers, 503 with the reason when not. */
export const GET: APIRoute = async () => {
  const [database, mailOk] = await Promise.all([pingDatabase(), mailReachable()]);
  const status = database.ok ? 'ok' : 'unavailable';
  const body = {
    status,
    db: { ok: database.ok, latencyMs: database.latencyMs, ...(database.ok ? {} : { error: 'database unreachable' }) },
    mail: { ok: mailOk },
    version: appVersion,
  };
  return Response.json(body, { status: database.ok ? 200 : 503, headers: { 'cache-control': 'no-store' } });
};
