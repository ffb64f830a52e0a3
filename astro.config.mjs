// @ts-check
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';
import auth from 'auth-astro';
import outboxWorker from './src/integrations/outbox-worker.ts';
import clientAddress from './src/integrations/client-address.ts';
import walkServiceWorker from './src/integrations/walk-service-worker.ts';
import serverEntry from './src/integrations/server-entry.ts';

// Server-rendered app: the Node adapter in middleware mode gives Astro's request handler
// (dist/server/entry.mjs); our own server around it (src/serve.ts, bundled by serverEntry) is
// what runs: `node dist/server/serve.mjs`.
export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'middleware' }),
  integrations: [
    react(),
    auth({ injectEndpoints: false }),
    outboxWorker(),
    clientAddress(),
    walkServiceWorker(),
    serverEntry(),
  ],
  server: { host: process.env.HOST ?? '127.0.0.1', port: Number(process.env.PORT ?? 4321) },
  // Cross-site writes (forms and JSON alike) are refused by src/middleware.ts, which compares
  // Origin with the configured public origin (src/lib/server/auth/public-origin.ts). Astro's own
  // check compares with Astro.url, whose host is "localhost" unless security.allowedDomains is
  // set at build time, so it refused every form. (The server drops X-Forwarded-Host/-Proto before
  // Astro builds the request: src/lib/server/http/node-server.ts.)
  security: { checkOrigin: false },
  vite: {
    plugins: [tailwindcss()],
    ssr: { external: ['@node-rs/argon2', 'pg', 'knex', 'pg-boss'] },
  },
});
