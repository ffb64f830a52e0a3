/**
 * Builds the walk-through's service worker after `astro build`: esbuild bundles
 * src/service-worker/walk-sw.ts (workbox's modules included) and workbox-build injects the
 * list of files to precache — every script and style sheet of the build and the Latin fonts —
 * each with its revision, into `dist/client/walk-sw.js`. `astro dev` has no service worker
 * (the page registers one only in a production build).
 */
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { AstroIntegration } from 'astro';
import { build } from 'esbuild';
import { injectManifest } from 'workbox-build';

export const SERVICE_WORKER_FILE = 'walk-sw.js';

export default function walkServiceWorker(): AstroIntegration {
  let clientDir = '';
  return {
    name: 'latchwell-walk-service-worker',
    hooks: {
      'astro:config:done': ({ config }) => {
        clientDir = fileURLToPath(config.build.client);
      },
      'astro:build:done': async ({ logger }) => {
        const work = await mkdtemp(path.join(os.tmpdir(), 'latchwell-sw-'));
        try {
          const bundled = path.join(work, SERVICE_WORKER_FILE);
          await build({
            entryPoints: [fileURLToPath(new URL('../service-worker/walk-sw.ts', import.meta.url))],
            outfile: bundled,
            bundle: true,
            format: 'iife',
            target: 'es2020',
            minify: true,
            // workbox's modules log and check arguments only when not in production.
            define: { 'process.env.NODE_ENV': '"production"' },
            logLevel: 'warning',
          });
          const { count, size, warnings } = await injectManifest({
            swSrc: bundled,
            swDest: path.join(clientDir, SERVICE_WORKER_FILE),
            globDirectory: clientDir,
            // Fonts for other scripts load only on pages that need them (unicode-range): not kept.
            globPatterns: ['_astro/**/*.{js,css}', '_astro/**/*-latin-[0-9]*.woff2', 'favicon.svg'],
            globIgnores: [SERVICE_WORKER_FILE],
            // Hashed file names already change with their content.
            dontCacheBustURLsMatching: /^_astro\//,
            maximumFileSizeToCacheInBytes: 2 * 1024 * 1024,
          });
          for (const warning of warnings) logger.warn(warning);
          logger.info(`${SERVICE_WORKER_FILE}: ${count} files precached (${Math.round(size / 1024)} KiB)`);
        } finally {
          await rm(work, { recursive: true, force: true });
        }
      },
    },
  };
}
