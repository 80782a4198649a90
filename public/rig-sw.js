/*
 * Service worker of the rig pages: keeps the rig page shell and the app's static files so that the
 * page opens at the bench without network. Registered only by the rig page (scope /campaigns/), as
 * /rig-sw.js?build=<build id>: each deploy is a new worker with its own cache, and when it activates
 * it deletes the caches of earlier builds (their pages point at static files that no longer exist)
 * and takes over the open pages. The log entries waiting to be sent live in the page's IndexedDB
 * outbox, never in these caches, so the eviction cannot lose one.
 * Rig page documents: network first, the last copy when offline. Hashed static files (/_next/static/):
 * cache first. Everything else, and every non-GET request, goes to the network untouched.
 */
const CACHE_PREFIX = 'saltus-rig-shell-';

/** The cache of one build: the build id from the worker's URL, letters, digits, . _ - only. */
function cacheNameFor(scriptUrl) {
  const build = (new URL(scriptUrl).searchParams.get('build') || 'dev').replace(/[^A-Za-z0-9._-]/g, '').slice(0, 64) || 'dev';
  return CACHE_PREFIX + build;
}

/** Caches to delete when `current` activates: every rig shell cache of another build, nothing else. */
function staleCaches(names, current) {
  return names.filter((name) => name.startsWith(CACHE_PREFIX) && name !== current);
}

const CACHE = cacheNameFor(self.location.href);
const RIG_PAGE = /^\/campaigns\/[^/]+\/rigs\/[^/]+\/?$/;

self.addEventListener('install', () => {
  self.skipWaiting();
});

self.addEventListener('activate', (event) => {
  event.waitUntil(
    (async () => {
      for (const name of staleCaches(await caches.keys(), CACHE)) await caches.delete(name);
      await self.clients.claim();
    })(),
  );
});

/** The page sends the URLs it loaded before this worker controlled it: { type: 'cache', urls: [...] }. */
self.addEventListener('message', (event) => {
  const data = event.data;
  if (!data || data.type !== 'cache' || !Array.isArray(data.urls)) return;
  event.waitUntil(
    (async () => {
      const cache = await caches.open(CACHE);
      for (const url of data.urls) {
        try {
          const u = new URL(url, self.location.origin);
          if (u.origin !== self.location.origin) continue;
          if (!(RIG_PAGE.test(u.pathname) || u.pathname.startsWith('/_next/static/'))) continue;
          const key = RIG_PAGE.test(u.pathname) ? u.origin + u.pathname : u.href;
          if (await cache.match(key)) continue;
          const res = await fetch(u.href, { credentials: 'same-origin' });
          if (res.ok) await cache.put(key, res);
        } catch {
          /* offline or gone: the next visit fills it */
        }
      }
      if (event.source && 'postMessage' in event.source) event.source.postMessage({ type: 'cached' });
    })(),
  );
});

self.addEventListener('fetch', (event) => {
  const req = event.request;
  if (req.method !== 'GET') return;
  const url = new URL(req.url);
  if (url.origin !== self.location.origin) return;

  if (req.mode === 'navigate' && RIG_PAGE.test(url.pathname)) {
    event.respondWith(
      (async () => {
        const cache = await caches.open(CACHE);
        try {
          const res = await fetch(req);
          // a redirect to /login (signed out) is not the rig page: never keep it in place of one
          if (res.ok && !res.redirected) await cache.put(url.origin + url.pathname, res.clone());
          return res;
        } catch {
          const cached = await cache.match(url.origin + url.pathname);
          if (cached) return cached;
          return new Response('<!doctype html><meta charset="utf-8"><title>Offline</title><p>This rig page was not opened on this tablet while online; open it once with network.</p>', {
            status: 503,
            headers: { 'content-type': 'text/html; charset=utf-8' },
          });
        }
      })(),
    );
    return;
  }

  if (url.pathname.startsWith('/_next/static/')) {
    event.respondWith(
      (async () => {
        const cache = await caches.open(CACHE);
        const cached = await cache.match(req);
        if (cached) return cached;
        const res = await fetch(req);
        if (res.ok) await cache.put(req, res.clone());
        return res;
      })(),
    );
  }
});
