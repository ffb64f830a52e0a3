import type { APIRoute } from 'astro';
import { pingDatabase } from '@/lib/server/db';
import { mailHealth } from '@/lib/server/health';
import { appVersion } from '@/lib/server/version';

/**
 * Liveness and dependencies: 200 when the database answers, 503 with the reason when not.
 * The database is asked on every call (one pooled connection, no new socket while it is up);
 * the mail server's answer comes from a background check, with its age (see server/health).
 */
export const GET: APIRoute = async () => {
  const [database, mail] = await Promise.all([pingDatabase(), mailHealth()]);
  const status = database.ok ? 'ok' : 'unavailable';
  const body = {
    status,
    db: {
      ok: database.ok,
      latencyMs: database.latencyMs,
      ...(database.ok ? {} : { error: 'database unreachable' }),
    },
    mail,
    version: appVersion,
  };
  return Response.json(body, { status: database.ok ? 200 : 503, headers: { 'cache-control': 'no-store' } });
};
