/**
 * The production server's main: `node dist/server/serve.mjs` (bundled there at build time by
 * src/integrations/server-entry.ts). Loads Astro's request handler from `./entry.mjs` beside it
 * (the node adapter in middleware mode) and serves it with the client folder on HOST:PORT
 * through src/lib/server/http/node-server.ts. `npm start`, the tests and the benchmarks all
 * start this file (src/cli/services.ts).
 */
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createNodeServer, createRequestListener, type AstroHandler } from './lib/server/http/node-server';

interface AdapterEntry {
  handler: AstroHandler;
  options: { mode: string; client: string; server: string; host?: string | boolean; port?: number };
}

const here = path.dirname(fileURLToPath(import.meta.url));
const entry = (await import(new URL('./entry.mjs', import.meta.url).href)) as AdapterEntry;
if (entry.options.mode !== 'middleware')
  throw new Error(
    `the node adapter must run in middleware mode (astro.config.mjs), not ${entry.options.mode}`,
  );

// The client folder sits where the build put it relative to the server folder (dist/client).
const clientDir = path.resolve(
  here,
  path.relative(fileURLToPath(entry.options.server), fileURLToPath(entry.options.client)),
);
const configuredHost = entry.options.host;
const host =
  process.env.HOST ??
  (typeof configuredHost === 'string' ? configuredHost : configuredHost ? '0.0.0.0' : 'localhost');
const port = Number(process.env.PORT ?? entry.options.port ?? 8080);

const server = createNodeServer(createRequestListener(entry.handler, clientDir));
server.listen(port, host, () => {
  const scheme = 'cert' in server ? 'https' : 'http';
  if (process.env.ASTRO_NODE_LOGGING !== 'disabled')
    console.log(`[server] listening on ${scheme}://${host.includes(':') ? `[${host}]` : host}:${port}`);
});
