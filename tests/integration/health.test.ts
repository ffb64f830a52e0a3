import { describe, expect, inject, it } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { freePort, startAppServer } from '../../src/cli/services';
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
      env: { DATABASE_URL: viaProxy.toString(), SMTP_URL: inject('smtpUrl'), AUTH_SECRET: 'health-test-secret-0123456789', AUTH_TRUST_HOST: 'true', LATCHWELL_DATA_DIR: dataDir },
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
});
