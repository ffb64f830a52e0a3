import { defineConfig } from 'vitest/config';
import { fileURLToPath } from 'node:url';

const alias = { '@': fileURLToPath(new URL('./src', import.meta.url)) };

/**
 * Three projects: `unit` is pure (no database, no network) and runs in parallel;
 * `integration` talks to the built server and the private PostgreSQL started by
 * `npm test` (src/cli/test.ts), which passes their addresses through env; `e2e` drives
 * Debian's chromium through playwright-core against the same server, one file at a time.
 */
export default defineConfig({
  resolve: { alias },
  test: {
    projects: [
      {
        resolve: { alias },
        test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node' },
      },
      {
        resolve: { alias },
        test: {
          name: 'integration',
          include: ['tests/integration/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/integration/support/global-setup.ts'],
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/integration/support/global-setup.ts'],
          // One browser at a time: the files share one server and a 2-core machine.
          poolOptions: { forks: { singleFork: true } },
          testTimeout: 180_000,
          hookTimeout: 90_000,
        },
      },
    ],
  },
});
