/**
 * The walk-through's service worker (scope `/`, built by src/integrations/walk-service-worker.ts
 * with the precache list injected at build time). It keeps on the phone:
 * - every script, style sheet and Latin font the build made (precached when it installs, so a
 *   draft opened once reopens without signal, lazily loaded panels and the photo reducer too);
 * - the walk-through pages the signed-in person opened (network first, the kept copy without
 *   signal): the page carries the draft, the gate and the pinned ruleset version's questions;
 * - photo thumbnails and display sizes of those drafts (content-addressed, so cache first).
 * Nothing else: no other HTML, no other API answer, never a POST (unsent edits live in
 * IndexedDB, src/lib/walk/edit-queue.ts). Kept pages and photos belong to one person: they are
 * dropped when anyone signs in or out on this phone, or when a page says another person is
 * signed in.
 */
/// <reference lib="webworker" />
import { CacheableResponsePlugin } from 'workbox-cacheable-response';
import { clientsClaim } from 'workbox-core';
import { ExpirationPlugin } from 'workbox-expiration';
import { cleanupOutdatedCaches, precacheAndRoute, type PrecacheEntry } from 'workbox-precaching';
import { registerRoute } from 'workbox-routing';
import { CacheFirst, NetworkFirst } from 'workbox-strategies';
import type { WorkboxPlugin } from 'workbox-core/types';

declare const self: ServiceWorkerGlobalScope & { __WB_MANIFEST: (PrecacheEntry | string)[] };

const PAGES = 'latchwell-walk-pages';
const PHOTOS = 'latchwell-walk-photos';
const OWNER = 'latchwell-walk-owner';
const OWNER_KEY = '/__walk-owner';

const WALK_PAGE = /^\/assessments\/[0-9a-f-]{36}\/walk$/;
const PHOTO_FILE = /^\/api\/assessments\/[0-9a-f-]{36}\/photos\/[0-9a-f-]{36}$/;
/** Sign-in, sign-out and their callbacks: another person may be next. */
const SESSION_CHANGE = /^\/(auth|api\/auth|signin)(\/|$)/;

self.skipWaiting();
clientsClaim();
precacheAndRoute(self.__WB_MANIFEST);
cleanupOutdatedCaches();

/** A sign-in page the server redirected to must never be kept under the walk page's address. */
const notRedirected: WorkboxPlugin = {
  cacheWillUpdate: async ({ response }) => (response.redirected ? null : response),
};

const walkPages = new NetworkFirst({
  cacheName: PAGES,
  // A weak signal that answers nothing for this long is treated as none.
  networkTimeoutSeconds: 10,
  plugins: [
    new CacheableResponsePlugin({ statuses: [200] }),
    notRedirected,
    new ExpirationPlugin({ maxEntries: 40, maxAgeSeconds: 30 * 24 * 3600 }),
  ],
});

const photoFiles = new CacheFirst({
  cacheName: PHOTOS,
  plugins: [
    new CacheableResponsePlugin({ statuses: [200] }),
    notRedirected,
    new ExpirationPlugin({ maxEntries: 400, maxAgeSeconds: 30 * 24 * 3600 }),
  ],
});

const isWalkPage = (url: URL) =>
  url.origin === self.location.origin && WALK_PAGE.test(url.pathname) && url.search === '';
const isPhotoFile = (url: URL) =>
  url.origin === self.location.origin &&
  PHOTO_FILE.test(url.pathname) &&
  /^\?size=(thumb|display)$/.test(url.search);

registerRoute(({ url, request }) => request.method === 'GET' && isWalkPage(url), walkPages);
registerRoute(({ url, request }) => request.method === 'GET' && isPhotoFile(url), photoFiles);

async function forgetPerson(): Promise<void> {
  await Promise.all([caches.delete(PAGES), caches.delete(PHOTOS), caches.delete(OWNER)]);
}

/** Keeps pages for one person only: a different person's page drops what the last one kept. */
async function adoptOwner(user: string): Promise<void> {
  const owners = await caches.open(OWNER);
  const current = await owners.match(OWNER_KEY);
  if (current && (await current.text()) === user) return;
  await forgetPerson();
  await (await caches.open(OWNER)).put(OWNER_KEY, new Response(user));
}

self.addEventListener('fetch', (event) => {
  const url = new URL(event.request.url);
  if (
    event.request.method !== 'GET' &&
    url.origin === self.location.origin &&
    SESSION_CHANGE.test(url.pathname)
  ) {
    // Not answered here: the request goes on to the server as usual.
    event.waitUntil(forgetPerson());
  }
});

interface KeepMessage {
  type: 'KEEP_WALK_PAGE';
  user: string;
  url: string;
  photos?: unknown[];
}

/**
 * The walk page asks to be kept (it loaded before this worker controlled it), with the photo
 * files it shows; answers `{ kept }` once they are in the cache.
 */
self.addEventListener('message', (event) => {
  const data = event.data as KeepMessage | undefined;
  if (data?.type !== 'KEEP_WALK_PAGE') return;
  const reply = (kept: boolean) => event.ports[0]?.postMessage({ kept });
  if (typeof data.user !== 'string' || !data.user || typeof data.url !== 'string') return reply(false);
  const page = new URL(data.url, self.location.origin);
  if (!isWalkPage(page)) return reply(false);
  const photos = (Array.isArray(data.photos) ? data.photos : [])
    .filter((u): u is string => typeof u === 'string')
    .map((u) => new URL(u, self.location.origin))
    .filter(isPhotoFile)
    .slice(0, 200);
  event.waitUntil(
    (async () => {
      await adoptOwner(data.user);
      const response = await walkPages
        .handle({ event, request: new Request(page.href, { credentials: 'same-origin' }) })
        .catch(() => null);
      await Promise.all(
        photos.map((u) =>
          photoFiles
            .handle({ event, request: new Request(u.href, { credentials: 'same-origin' }) })
            .catch(() => null),
        ),
      );
      reply(Boolean(response?.ok && !response.redirected));
    })(),
  );
});
