// Traycast offline cache. On install it reads the built index.html and caches every file it
// references (Trunk hashes their names, so the list is whatever this build produced), then serves
// network first with the cache as fallback, so the workbench starts with the network off.
const CACHE = 'traycast-offline-v2';

self.addEventListener('install', (event) => {
  event.waitUntil((async () => {
    const cache = await caches.open(CACHE);
    const index = await fetch('./', { cache: 'no-store' });
    const html = await index.clone().text();
    await cache.put('./', index);
    const urls = new Set(['manifest.webmanifest', 'icon.svg', 'worker.js']);
    for (const m of html.matchAll(/(?:href|src)="([^"#]+)"/g)) {
      if (!m[1].startsWith('http')) urls.add(m[1]);
    }
    await cache.addAll([...urls]);
    self.skipWaiting();
  })());
});

self.addEventListener('activate', (event) => event.waitUntil(self.clients.claim()));

self.addEventListener('fetch', (event) => {
  if (event.request.method !== 'GET') return;
  event.respondWith((async () => {
    const cache = await caches.open(CACHE);
    try {
      const response = await fetch(event.request);
      if (response.ok && new URL(event.request.url).origin === self.location.origin) {
        cache.put(event.request, response.clone());
      }
      return response;
    } catch (err) {
      const hit = await cache.match(event.request, { ignoreSearch: true });
      if (hit) return hit;
      if (event.request.mode === 'navigate') return cache.match('./');
      throw err;
    }
  })());
});
