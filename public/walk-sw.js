/*
 * Latchwell walk-through service worker (scope /assessments/). Keeps the walk-through page and
 * the files it loads on the phone so the page reopens without signal; the answers themselves
 * live in IndexedDB (src/lib/walk/outbox.ts), never here. API calls always go to the network,
 * except photo files, which never change (content-addressed) and are kept once seen.
 */
const CACHE = 'latchwell-walk-v1';
const WALK_PAGE = /^\/assessments\/[^/]+\/walk\/?$/;
const PHOTO_FILE = /^\/api\/assessments\/[^/]+\/photos\/[^/]+$/;
const STATIC_FILE = /^\/(_astro\/|favicon\.svg$)/;

self.addEventListener('install', () => self.skipWaiting());
self.addEventListener('activate', (event) => event.waitUntil(self.clients.claim()));

async function keep(request, response) {
  if (response && response.ok && response.type === 'basic' && !response.redirected) {
    const cache = await caches.open(CACHE);
    await cache.put(request, response.clone());
  }
  return response;
}

async function networkFirst(request) {
  try {
    return await keep(request, await fetch(request));
  } catch (error) {
    const cached = await caches.match(request, { ignoreSearch: true });
    if (cached) return cached;
    throw error;
  }
}

async function cacheFirst(request) {
  const cached = await caches.match(request);
  if (cached) return cached;
  return keep(request, await fetch(request));
}

self.addEventListener('fetch', (event) => {
  const request = event.request;
  const url = new URL(request.url);
  if (url.origin !== self.location.origin) return;
  if (request.method === 'POST' && url.pathname.startsWith('/auth/signout')) {
    // Signing out: pages cached for this person must not stay on a shared phone.
    event.waitUntil(caches.delete(CACHE));
    return;
  }
  if (request.method !== 'GET') return;
  if (request.mode === 'navigate' && WALK_PAGE.test(url.pathname)) event.respondWith(networkFirst(request));
  else if (STATIC_FILE.test(url.pathname) || PHOTO_FILE.test(url.pathname)) event.respondWith(cacheFirst(request));
});

/** The page lists what it loaded before this worker took control; keep those too. */
self.addEventListener('message', (event) => {
  const data = event.data;
  if (!data || data.type !== 'keep' || !Array.isArray(data.urls)) return;
  event.waitUntil(
    caches.open(CACHE).then((cache) =>
      Promise.all(
        data.urls
          .filter((u) => typeof u === 'string')
          .map((u) => new URL(u, self.location.origin))
          .filter((u) => u.origin === self.location.origin && (STATIC_FILE.test(u.pathname) || WALK_PAGE.test(u.pathname)))
          .map(async (u) => {
            if (!WALK_PAGE.test(u.pathname) && (await cache.match(u.href))) return;
            const response = await fetch(u.href, { credentials: 'same-origin' }).catch(() => null);
            if (response && response.ok && !response.redirected) await cache.put(u.href, response);
          }),
      ),
    ),
  );
});
