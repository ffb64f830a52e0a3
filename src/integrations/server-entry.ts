/**
 * Bundles the production server's main (src/serve.ts) to `dist/server/serve.mjs` after
 * `astro build`, beside the node adapter's `entry.mjs` that it loads. Packages stay imports
 * of node_modules, as in the rest of the server build.
 */
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { AstroIntegration } from 'astro';
import { build } from 'esbuild';

export const SERVER_MAIN_FILE = 'serve.mjs';

export default function serverEntry(): AstroIntegration {
  let serverDir = '';
  return {
    name: 'latchwell-server-entry',
    hooks: {
      'astro:config:done': ({ config }) => {
        serverDir = fileURLToPath(config.build.server);
      },
      'astro:build:done': async ({ logger }) => {
        await build({
          entryPoints: [fileURLToPath(new URL('../serve.ts', import.meta.url))],
          outfile: path.join(serverDir, SERVER_MAIN_FILE),
          bundle: true,
          platform: 'node',
          format: 'esm',
          target: 'node20',
          packages: 'external',
          logLevel: 'warning',
        });
        logger.info(`${SERVER_MAIN_FILE}: the server's main`);
      },
    },
  };
}
