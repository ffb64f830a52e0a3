/** `npm run dev`: the database, migrations, rulesets, demo data and mail catcher, then `astro dev`. */
import { spawn } from 'node:child_process';
import path from 'node:path';
import { ensureDatabase } from '../../db/launcher';
import { listeningOrigin } from '../lib/server/auth/public-origin';
import { startMailCatcher } from '../lib/server/mail/catcher';
import { migrateLatest } from './migrate';
import { publishRulesetFiles } from './publish-rulesets';
import { seedIfEmpty } from './seed';
import { authSecret, dataDir, projectRoot } from './services';

const smtpPort = Number(process.env.MAIL_SMTP_PORT ?? 2525);
const httpPort = Number(process.env.MAIL_HTTP_PORT ?? 2526);
// E-mailed links point at the dev server unless AUTH_URL / PUBLIC_URL says otherwise.
if (!process.env.AUTH_URL && !process.env.PUBLIC_URL)
  process.env.PUBLIC_URL = listeningOrigin(process.env.HOST ?? '127.0.0.1', process.env.PORT ?? 4321);
const db = await ensureDatabase();
await migrateLatest(db.migrationUrl, db.appRole);
await publishRulesetFiles(db.migrationUrl);
await seedIfEmpty(db.migrationUrl);
const catcher = await startMailCatcher({ dir: path.join(dataDir, 'mail'), smtpPort, httpPort }).catch(
  () => undefined,
);

const child = spawn(process.execPath, [path.join(projectRoot, 'node_modules/astro/astro.js'), 'dev'], {
  cwd: projectRoot,
  stdio: 'inherit',
  env: {
    ...process.env,
    DATABASE_URL: db.appUrl,
    SMTP_URL: process.env.SMTP_URL ?? `smtp://127.0.0.1:${smtpPort}`,
    MAIL_CATCHER_URL: `http://127.0.0.1:${httpPort}`,
    AUTH_SECRET: authSecret(),
    AUTH_TRUST_HOST: 'true',
    LATCHWELL_DATA_DIR: dataDir,
  },
});
child.on('exit', async (code) => {
  await catcher?.close();
  process.exit(code ?? 0);
});
process.on('SIGINT', () => child.kill('SIGINT'));
