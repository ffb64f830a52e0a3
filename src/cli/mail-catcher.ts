/** Runs the local mail catcher on its own (npm start runs it too). Ports: MAIL_SMTP_PORT, MAIL_HTTP_PORT. */
import path from 'node:path';
import { startMailCatcher } from '../lib/server/mail/catcher';
import { dataDir } from './services';

const smtpPort = Number(process.env.MAIL_SMTP_PORT ?? 2525);
const httpPort = Number(process.env.MAIL_HTTP_PORT ?? 2526);
const catcher = await startMailCatcher({
  dir: process.env.MAIL_CATCHER_DIR ?? path.join(dataDir, 'mail'),
  smtpPort,
  httpPort,
});
console.log(
  `[mail] catching SMTP on 127.0.0.1:${smtpPort}; messages at http://127.0.0.1:${httpPort}/messages`,
);
for (const signal of ['SIGINT', 'SIGTERM'] as const)
  process.once(signal, () => void catcher.close().then(() => process.exit(0)));
