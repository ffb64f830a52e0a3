/**
 * A second server instance whose database connection goes through a relay that counts the
 * bytes PostgreSQL sends (`tcp-proxy.ts`), with a data folder of its own: for tests that prove
 * what an answer costs the database, not only what it says.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { inject } from 'vitest';
import { freePort, startAppServer, type RunningServer } from '../../../src/cli/services';
import type { TestClient } from './fixtures';
import { startTcpProxy, type TcpProxy } from './tcp-proxy';

export interface CountingServer {
  server: RunningServer;
  proxy: TcpProxy;
  /** A GET of `pathAndQuery` as `client`; the answer's text and the bytes the database sent meanwhile. */
  get(
    pathAndQuery: string,
    client: TestClient,
  ): Promise<{ res: Response; text: string; databaseBytes: number }>;
  stop(): Promise<void>;
}

export async function startCountingServer(name: string): Promise<CountingServer> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), `latchwell-${name}-`));
  const dbUrl = new URL(inject('databaseUrl'));
  const proxy = await startTcpProxy(dbUrl.hostname, Number(dbUrl.port));
  const viaProxy = new URL(dbUrl);
  viaProxy.port = String(proxy.port);
  const server = await startAppServer({
    port: await freePort(),
    quiet: true,
    env: {
      ...inject('serverEnv'),
      DATABASE_URL: viaProxy.toString(),
      OUTBOX_WORKER: 'off',
      LATCHWELL_DATA_DIR: dataDir,
    },
  });
  return {
    server,
    proxy,
    async get(pathAndQuery, client) {
      const before = proxy.bytesFromTarget;
      const res = await fetch(`${server.url}${pathAndQuery}`, {
        headers: { cookie: client.cookie, origin: server.url, accept: 'application/json' },
      });
      const text = await res.text();
      return { res, text, databaseBytes: proxy.bytesFromTarget - before };
    },
    async stop() {
      await server.stop();
      await proxy.close();
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}
