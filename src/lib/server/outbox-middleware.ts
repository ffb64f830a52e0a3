/** Starts this process's job queue and workers on its first request (see src/integrations/outbox-worker.ts). */
import { defineMiddleware } from 'astro:middleware';
import { ensureOutboxWorker } from './outbox';
import './reinspection-schedule';
import './impact-runs';

export const onRequest = defineMiddleware((context, next) => {
  if (!context.isPrerendered) ensureOutboxWorker();
  return next();
});
