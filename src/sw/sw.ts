/// <reference lib="webworker" />
/**
 * The service worker: keeps the whole app on the tablet so it starts with no network.
 * It never takes over by itself: a new version waits until the person agrees in the page (sw-bridge.ts).
 * Records never pass through here; the app's own outbox in IndexedDB is the only path to the server.
 */
import { clientsClaim } from 'workbox-core';
import { cleanupOutdatedCaches, createHandlerBoundToURL, precacheAndRoute } from 'workbox-precaching';
import { NavigationRoute, registerRoute } from 'workbox-routing';
import { isSkipWaitingMessage } from './messages';

declare const self: ServiceWorkerGlobalScope & {
  __WB_MANIFEST: Array<{ url: string; revision: string | null } | string>;
};

// The build injects every file of the app here: the shell, each lazy chunk, styles, manifest and icons.
precacheAndRoute(self.__WB_MANIFEST);
cleanupOutdatedCaches();

// Every in-app address opens the cached shell; the API is always the network's.
registerRoute(new NavigationRoute(createHandlerBoundToURL('/index.html'), { denylist: [/^\/api\//] }));

// When a version activates (first install, or an update the person accepted) it takes control of open pages.
clientsClaim();

self.addEventListener('message', (event) => {
  if (isSkipWaitingMessage(event.data)) void self.skipWaiting();
});

// Background sync (Chromium): wake the open pages to run their sync. The outbox in IndexedDB stays the only queue.
self.addEventListener('sync', (event: Event & { tag?: string; waitUntil?: (p: Promise<unknown>) => void }) => {
  if (event.tag !== 'crankhouse-sync') return;
  event.waitUntil?.(
    self.clients.matchAll({ type: 'window' }).then((clients) => {
      for (const client of clients) client.postMessage({ type: 'SYNC_NOW' });
    }),
  );
});
