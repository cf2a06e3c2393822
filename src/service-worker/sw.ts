/// <reference lib="webworker" />
// The app's service worker: it keeps the app itself (its page, code, styles and fonts) on the device
// so that Waterline opens without a signal and says so, instead of the browser's own error page.
// It never keeps answers from the server: bookings, jobs and householders' details stay off the
// device (src/composables/useApiResource.ts keeps the last answers in the open tab's memory only).
import { clientsClaim } from 'workbox-core';
import { cleanupOutdatedCaches, matchPrecache, precacheAndRoute } from 'workbox-precaching';
import { NavigationRoute, registerRoute } from 'workbox-routing';
import { CacheFirst, NetworkOnly } from 'workbox-strategies';
import { ExpirationPlugin } from 'workbox-expiration';
import { SERVER_OWNED_PAGES, isAppFile } from './routes';

declare const self: ServiceWorkerGlobalScope & { __WB_MANIFEST: { url: string; revision: string | null }[] };

// A new version takes over at once: the app's files are hashed, so an open page keeps the ones it
// loaded and the next page loads the new ones.
void self.skipWaiting();
clientsClaim();
cleanupOutdatedCaches();

// What every page needs to open: written into the list by the build (vite.config.ts says which).
precacheAndRoute(self.__WB_MANIFEST);

// Pages of the app: asked of the server (a new version shows at once, and nothing of the page is
// kept); with no answer within 10 s, the app's page as the build kept it, whichever address was
// asked for. Links from e-mails, sign-in, feeds and payment pages are the server's own and never
// answered from here.
registerRoute(
  new NavigationRoute(
    new NetworkOnly({
      networkTimeoutSeconds: 10,
      plugins: [{ handlerDidError: async () => (await matchPrecache('/index.html')) ?? Response.error() }],
    }),
    { denylist: SERVER_OWNED_PAGES },
  ),
);

// The rest of the app's files, as pages use them (the board and the reports' charts are not
// fetched ahead: most phones never open them). Hashed names never change, so a kept one is right.
registerRoute(
  ({ url, request }) => url.origin === self.location.origin && request.method === 'GET' && isAppFile(url.pathname),
  new CacheFirst({
    cacheName: 'waterline-files',
    plugins: [new ExpirationPlugin({ maxEntries: 200, maxAgeSeconds: 60 * 24 * 3600 })],
  }),
);
