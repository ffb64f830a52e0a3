/** Starts this process's outbox worker on its first request (see src/integrations/outbox-worker.ts). */
import { defineMiddleware } from 'astro:middleware';
import { ensureOutboxWorker } from './outbox';

export const onRequest = defineMiddleware((context, next) => {
  if (!context.isPrerendered) ensureOutboxWorker();
  return next();
});
