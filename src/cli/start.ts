/**
 * `npm start`: database, migrations, rulesets, demo data, build, mail catcher and server,
 * in that order, then the URL and the demo sign-ins. Ctrl-C stops everything it started.
 *
 * Runs under plain node with tsx's loader (`node --import tsx`), not the `tsx` command: that
 * command relays Ctrl-C to its child and kills it when it does not acknowledge within 30 ms,
 * which could happen while this process waited on `pg_ctl stop`, leaving the database running.
 */
import path from 'node:path';
import { ensureDatabase, stopDatabase } from '../../db/launcher';
import { demoHomeownerEmail, demoPassword, demoStaff } from '../../db/seeds/demo/people';
import { listeningOrigin } from '../lib/server/auth/public-origin';
import { startMailCatcher, type RunningCatcher } from '../lib/server/mail/catcher';
import { migrateLatest } from './migrate';
import { publishRulesetFiles } from './publish-rulesets';
import { seedIfEmpty } from './seed';
import { authSecret, dataDir, ensureBuilt, startAppServer } from './services';

const host = process.env.HOST ?? '127.0.0.1';
const port = Number(process.env.PORT ?? 4321);
const smtpPort = Number(process.env.MAIL_SMTP_PORT ?? 2525);
const httpPort = Number(process.env.MAIL_HTTP_PORT ?? 2526);
// E-mailed links (the demo seed's too) point here unless AUTH_URL / PUBLIC_URL says otherwise.
// Forms are accepted only from that address too.
if (!process.env.AUTH_URL && !process.env.PUBLIC_URL) {
  process.env.PUBLIC_URL = listeningOrigin(host, port);
  if (host === '0.0.0.0' || host === '::')
    console.warn(
      `[server] forms are accepted only from ${process.env.PUBLIC_URL}; set PUBLIC_URL to the address other devices use`,
    );
}

const db = await ensureDatabase();
const applied = await migrateLatest(db.migrationUrl, db.appRole);
if (applied.length) console.log(`[db] applied ${applied.length} migration(s)`);
const published = await publishRulesetFiles(db.migrationUrl);
if (published.length) console.log(`[rulesets] published ${published.join(', ')}`);
if (await seedIfEmpty(db.migrationUrl)) console.log('[db] seeded the demo scenario');
await ensureBuilt();

let catcher: RunningCatcher | undefined;
const externalSmtp = Boolean(process.env.SMTP_URL);
if (!externalSmtp) {
  try {
    catcher = await startMailCatcher({ dir: path.join(dataDir, 'mail'), smtpPort, httpPort });
    console.log(`[mail] catcher on smtp://127.0.0.1:${smtpPort} (messages: owner's Caught mail page)`);
  } catch (error) {
    console.warn(`[mail] could not start the catcher (${(error as Error).message}); is another one running?`);
  }
}

const server = await startAppServer({
  host,
  port,
  env: {
    DATABASE_URL: db.appUrl,
    SMTP_URL: process.env.SMTP_URL ?? `smtp://127.0.0.1:${smtpPort}`,
    MAIL_CATCHER_URL: process.env.MAIL_CATCHER_URL ?? `http://127.0.0.1:${httpPort}`,
    AUTH_SECRET: authSecret(),
    AUTH_TRUST_HOST: 'true',
    LATCHWELL_DATA_DIR: dataDir,
  },
});

console.log(`
Latchwell is running at ${server.url}

Demo sign-ins (password for staff: ${demoPassword})
${demoStaff.map((s) => `  ${s.role.padEnd(9)} ${s.email}`).join('\n')}
  homeowner ${demoHomeownerEmail} (one-time link by e-mail; see Caught mail as the owner)

Press Ctrl-C to stop.`);

let stopping = false;
async function shutdown(code = 0) {
  if (stopping) return;
  stopping = true;
  console.log('\nstopping…');
  await server.stop();
  await catcher?.close();
  if (db.startedHere) stopDatabase();
  process.exit(code);
}
process.on('SIGINT', () => void shutdown());
process.on('SIGTERM', () => void shutdown());
server.child.on('exit', (code) => {
  if (!stopping) {
    console.error(`server exited (${code})`);
    void shutdown(1);
  }
});
