/**
 * Puts the walk-through on the phone for use without signal: registers the service worker
 * (workbox-window; its precache holds every script of the build), then asks it to keep this
 * page and the photos it shows for the signed-in person. Resolves true once they are kept.
 */
import { Workbox } from 'workbox-window';

export const SERVICE_WORKER_URL = '/walk-sw.js';

export async function keepWalkPageOffline(user: string): Promise<boolean> {
  if (!('serviceWorker' in navigator) || !('caches' in window)) return false;
  const workbox = new Workbox(SERVICE_WORKER_URL, { scope: '/' });
  await workbox.register();
  // Active means installed: the precache is complete.
  await navigator.serviceWorker.ready;
  const photos = [...document.querySelectorAll<HTMLImageElement>('img[src*="/photos/"]')].map(
    (img) => img.src,
  );
  const answer = (await workbox.messageSW({
    type: 'KEEP_WALK_PAGE',
    user,
    url: location.pathname,
    photos,
  })) as { kept?: boolean } | undefined;
  return answer?.kept === true;
}
