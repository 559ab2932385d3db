/// <reference lib="webworker" />
// Sumpwise's service worker (built by vite-plugin-pwa in injectManifest mode with Workbox).
// - The built scripts, styles, fonts and icons are precached: the app shell works with no network.
// - Pages are fetched from the network first; the last good copy of each is kept, and when the network
//   fails that copy is served marked as a saved copy (the page then says "offline: showing what was saved
//   at <time>"). Pages never seen offline get a short offline page.
// - Queued writes are sent from here too when the browser fires Background Sync.
// - A new version waits until the rider reloads from the "new version" notice: code is never swapped under
//   an open form.
import { cleanupOutdatedCaches, precacheAndRoute, matchPrecache } from 'workbox-precaching';
import { registerRoute, setCatchHandler } from 'workbox-routing';
import { NetworkFirst } from 'workbox-strategies';
import { ExpirationPlugin } from 'workbox-expiration';
import type { WorkboxPlugin } from 'workbox-core';
import { flushOutbox, SYNC_TAG } from './components/offline/outbox-sync';
import { PAGE_CACHE, SAVED_AT_HEADER, isCacheablePage, markSavedCopy } from './lib/offline/page-cache';

declare const self: ServiceWorkerGlobalScope & { __WB_MANIFEST: (string | { url: string; revision: string | null })[] };

precacheAndRoute(self.__WB_MANIFEST);
cleanupOutdatedCaches();

/** Keeps only good, final pages, stamped with the time they were saved. */
const stampPlugin: WorkboxPlugin = {
  cacheWillUpdate: async ({ response }) => {
    if (
      response.status !== 200 ||
      response.redirected ||
      !(response.headers.get('content-type') ?? '').includes('text/html')
    )
      return null;
    const headers = new Headers(response.headers);
    headers.set(SAVED_AT_HEADER, new Date().toISOString());
    return new Response(await response.blob(), { status: 200, statusText: response.statusText, headers });
  },
  // Only reached when the network failed (network first): say so in the page itself.
  cachedResponseWillBeUsed: async ({ cachedResponse }) => {
    if (!cachedResponse) return null;
    const html = markSavedCopy(await cachedResponse.text(), cachedResponse.headers.get(SAVED_AT_HEADER) ?? '');
    return new Response(html, { status: 200, headers: cachedResponse.headers });
  },
};

registerRoute(
  ({ request, url }) => request.mode === 'navigate' && isCacheablePage(url.pathname),
  new NetworkFirst({
    cacheName: PAGE_CACHE,
    networkTimeoutSeconds: 6,
    plugins: [stampPlugin, new ExpirationPlugin({ maxEntries: 200, maxAgeSeconds: 30 * 24 * 3600 })],
  }),
);

setCatchHandler(async ({ request }) => {
  if (request.destination === 'document') return (await matchPrecache('/offline.html')) ?? Response.error();
  return Response.error();
});

self.addEventListener('message', (event) => {
  if ((event.data as { type?: string } | null)?.type === 'SKIP_WAITING') void self.skipWaiting();
});

self.addEventListener('sync', (event) => {
  const e = event as ExtendableEvent & { tag: string };
  if (e.tag === SYNC_TAG) e.waitUntil(flushOutbox().then(() => undefined));
});
