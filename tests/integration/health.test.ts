import { describe, expect, inject, it } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { freePort, startAppServer } from '../../src/cli/services';
import { SMTPServer } from 'smtp-server';
import { startTcpProxy } from './support/tcp-proxy';

const baseUrl = inject('baseUrl');

describe('GET /api/health', () => {
  it('reports the database and the mail catcher as reachable', async () => {
    const res = await fetch(`${baseUrl}/api/health`);
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.status).toBe('ok');
    expect(body.db.ok).toBe(true);
    expect(body.db.latencyMs).toBeGreaterThanOrEqual(0);
    expect(body.mail.ok).toBe(true);
    expect(body.version).toMatch(/^\d+\.\d+\.\d+/);
  });

  it('answers 503 with a clear body while the database is unreachable, and recovers without a restart', async () => {
    const dbUrl = new URL(inject('databaseUrl'));
    const proxy = await startTcpProxy(dbUrl.hostname, Number(dbUrl.port));
    const viaProxy = new URL(dbUrl);
    viaProxy.port = String(proxy.port);
    const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-health-'));
    const server = await startAppServer({
      port: await freePort(),
      quiet: true,
      env: {
        DATABASE_URL: viaProxy.toString(),
        SMTP_URL: inject('smtpUrl'),
        AUTH_SECRET: 'health-test-secret-0123456789',
        AUTH_TRUST_HOST: 'true',
        LATCHWELL_DATA_DIR: dataDir,
      },
    });
    try {
      expect((await fetch(`${server.url}/api/health`)).status).toBe(200);
      await proxy.cut();
      const down = await fetch(`${server.url}/api/health`);
      expect(down.status).toBe(503);
      const body = await down.json();
      expect(body.status).toBe('unavailable');
      expect(body.db).toMatchObject({ ok: false, latencyMs: null, error: 'database unreachable' });
      expect(JSON.stringify(body)).not.toMatch(/at .*\.js:\d+/); // no stack trace
      await proxy.restore();
      let recovered = 0;
      for (let i = 0; i < 20 && recovered !== 200; i++) {
        recovered = (await fetch(`${server.url}/api/health`)).status;
        if (recovered !== 200) await new Promise((r) => setTimeout(r, 250));
      }
      expect(recovered).toBe(200);
    } finally {
      await server.stop();
      await proxy.close();
      fs.rmSync(dataDir, { recursive: true, force: true });
    }
  });

  it(
    'checks the mail server in the background: a burst of calls opens at most one SMTP session per interval, and a stopped server shows as down',
    { timeout: 60_000 },
    async () => {
      const intervalMs = 1500;
      let sessions = 0;
      const smtp = new SMTPServer({
        authOptional: true,
        disabledCommands: ['STARTTLS'],
        logger: false,
        onConnect: (_session, callback) => {
          sessions++;
          callback();
        },
      });
      const smtpPort = await freePort();
      await new Promise<void>((resolve) => smtp.listen(smtpPort, '127.0.0.1', resolve));
      let smtpOpen = true;
      const server = await startAppServer({
        port: await freePort(),
        quiet: true,
        env: {
          ...inject('serverEnv'),
          SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
          OUTBOX_WORKER: 'off',
          HEALTH_CHECK_INTERVAL_MS: String(intervalMs),
        },
      });
      try {
        const first = await (await fetch(`${server.url}/api/health`)).json();
        expect(first.mail.ok).toBe(true);

        const before = sessions;
        const started = Date.now();
        for (let batch = 0; batch < 10; batch++) {
          const bodies = await Promise.all(
            Array.from({ length: 20 }, () => fetch(`${server.url}/api/health`).then((r) => r.json())),
          );
          for (const body of bodies) expect(body.mail.ok).toBe(true);
        }
        const elapsed = Date.now() - started;
        // 200 calls; the background check may have run once per interval meanwhile, plus one at the edge.
        expect(sessions - before).toBeLessThanOrEqual(Math.floor(elapsed / intervalMs) + 1);
        // The answer says how old it is.
        expect(first.mail.ageMs).toBeGreaterThanOrEqual(0);
        expect(Date.parse(first.mail.checkedAt)).not.toBeNaN();

        await new Promise<void>((resolve) => smtp.close(() => resolve()));
        smtpOpen = false;
        const deadline = Date.now() + 2 * intervalMs + 5000;
        let mail: { ok: boolean; ageMs: number } | undefined;
        do {
          await new Promise((r) => setTimeout(r, 250));
          const res = await fetch(`${server.url}/api/health`);
          expect(res.status).toBe(200); // mail down does not make the server unhealthy
          mail = (await res.json()).mail;
        } while (mail!.ok && Date.now() < deadline);
        expect(mail!.ok).toBe(false);
        expect(mail!.ageMs).toBeLessThan(2 * intervalMs + 2000);
      } finally {
        await server.stop();
        if (smtpOpen) await new Promise<void>((resolve) => smtp.close(() => resolve()));
      }
    },
  );
});
