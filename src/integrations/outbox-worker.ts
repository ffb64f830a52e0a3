/**
 * Runs the mail outbox worker inside every server process (built server, `astro dev`, the
 * test servers): a `pre` middleware whose first request starts the worker. Every launcher
 * polls /api/health while booting, so in practice the worker starts with the server.
 */
import type { AstroIntegration } from 'astro';

export default function outboxWorker(): AstroIntegration {
  return {
    name: 'latchwell-outbox-worker',
    hooks: {
      'astro:config:setup': ({ addMiddleware }) => {
        addMiddleware({
          entrypoint: new URL('../lib/server/outbox-middleware.ts', import.meta.url),
          order: 'pre',
        });
      },
    },
  };
}
