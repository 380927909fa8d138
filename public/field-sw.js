/*
 * Levelwire field view service worker: lets the field view reload without a network.
 * - Navigations to /sessions/<id>/field: network first, the cached copy when the network fails.
 * - /_next/static/*: cache first (names change with content in production); with ?dev=1 network first, since
 *   development serves changed scripts under the same names.
 * Nothing else is touched: API calls and the socket go to the network as usual (the page keeps the session's
 * log in IndexedDB and its unsent entries in the outbox).
 */
const CACHE = 'levelwire-field-v1';
const DEV = new URL(self.location.href).searchParams.get('dev') === '1';
const FIELD_PAGE = /^\/sessions\/[^/]+\/field\/?$/;

self.addEventListener('install', () => self.skipWaiting());

self.addEventListener('activate', (event) => {
  event.waitUntil(
    (async () => {
      for (const name of await caches.keys()) if (name.startsWith('levelwire-field-') && name !== CACHE) await caches.delete(name);
      await self.clients.claim();
    })(),
  );
});

async function networkFirst(request, key) {
  const cache = await caches.open(CACHE);
  try {
    const response = await fetch(request);
    if (response.ok && !response.redirected) await cache.put(key ?? request, response.clone());
    return response;
  } catch (err) {
    const cached = await cache.match(key ?? request, { ignoreSearch: true });
    if (cached) return cached;
    throw err;
  }
}

async function cacheFirst(request) {
  const cache = await caches.open(CACHE);
  const cached = await cache.match(request);
  if (cached) return cached;
  const response = await fetch(request);
  if (response.ok) await cache.put(request, response.clone());
  return response;
}

self.addEventListener('fetch', (event) => {
  const request = event.request;
  if (request.method !== 'GET') return;
  const url = new URL(request.url);
  if (url.origin !== self.location.origin) return;
  if (request.mode === 'navigate' && FIELD_PAGE.test(url.pathname)) {
    // Keyed by the page's address without its query, as the page itself stores it.
    event.respondWith(networkFirst(request, url.origin + url.pathname));
    return;
  }
  if (url.pathname.startsWith('/_next/static/')) {
    event.respondWith(DEV ? networkFirst(request) : cacheFirst(request));
  }
});
