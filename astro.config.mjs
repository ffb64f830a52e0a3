// @ts-check
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';

// Server-rendered app behind the Node standalone adapter: `node dist/server/entry.mjs`.
export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'standalone' }),
  integrations: [react()],
  server: { host: process.env.HOST ?? '127.0.0.1', port: Number(process.env.PORT ?? 4321) },
  security: { checkOrigin: true },
  vite: {
    plugins: [tailwindcss()],
    ssr: { external: ['@node-rs/argon2', 'pg', 'knex'] },
  },
});
