/// <reference lib="webworker" />
/**
 * Tilldawn's service worker (built by vite-plugin-pwa's injectManifest; the precache list is
 * injected in react-router.config.ts's buildEnd). No worker runs in development.
 *
 * - The app shell and every route's assets are precached.
 * - /api, *.data and the sign-in pages always go to the network: never a cached answer.
 * - App pages: the network first (short timeout), then the last copy of that page, then the
 *   offline page (which lists the pages this phone keeps).
 */
import { cleanupOutdatedCaches, precacheAndRoute } from "workbox-precaching";
import { registerRoute, setCatchHandler } from "workbox-routing";
import { NetworkFirst, NetworkOnly } from "workbox-strategies";

declare const self: ServiceWorkerGlobalScope & { __WB_MANIFEST: Array<{ url: string; revision: string | null }> };

const PAGES = "tilldawn-pages";
const OFFLINE_PAGE = "/offline.html";

/** Paths that must never be answered from a cache. */
const NETWORK_ONLY = [/^\/api\//, /\.data$/, /^\/auth\//, /^\/sign-in/, /^\/sign-out/, /^\/invites\//, /^\/dev\//, /^\/__manifest/];
const networkOnly = (path: string) => NETWORK_ONLY.some((re) => re.test(path));

// Replaced at build time by the precache list.
precacheAndRoute(self.__WB_MANIFEST);
cleanupOutdatedCaches();

registerRoute(({ url, sameOrigin }) => sameOrigin && networkOnly(url.pathname), new NetworkOnly());

// App pages: the network first, with a short timeout, then the last copy of that page.
const pages = new NetworkFirst({
  cacheName: PAGES,
  networkTimeoutSeconds: 3,
  plugins: [
    {
      // Only good, full pages are kept (never a redirect to sign-in or an error page).
      cacheWillUpdate: async ({ response }) => (response.status === 200 && !response.redirected ? response : null),
    },
  ],
});
registerRoute(({ request, url, sameOrigin }) => sameOrigin && request.mode === "navigate" && !networkOnly(url.pathname), pages);

setCatchHandler(async ({ request, url }) => {
  if (request.destination === "document" || request.mode === "navigate") {
    const path = url instanceof URL ? url.pathname : new URL(request.url).pathname;
    if (networkOnly(path)) return Response.error();
    const cache = await caches.open(PAGES);
    return (await cache.match(OFFLINE_PAGE)) ?? Response.error();
  }
  return Response.error();
});

self.addEventListener("install", (event) => {
  // The first visit is not controlled by the worker: keep the start page and the offline page.
  event.waitUntil(
    caches.open(PAGES).then((cache) => Promise.all(["/", OFFLINE_PAGE].map((u) => cache.add(u).catch(() => undefined)))),
  );
});

self.addEventListener("message", (event) => {
  const message = event.data as { type?: string; payload?: { urlsToCache?: string[] } } | undefined;
  if (message?.type === "SKIP_WAITING") void self.skipWaiting();
  if (message?.type === "CACHE_URLS") {
    // Pages the app asks to keep (the page just opened, and the rig's other offline pages).
    const urls = (message.payload?.urlsToCache ?? []).filter((u) => {
      const url = new URL(u, self.location.origin);
      return url.origin === self.location.origin && !networkOnly(url.pathname);
    });
    event.waitUntil(
      caches.open(PAGES).then((cache) =>
        Promise.all(
          urls.map(async (u) => {
            const response = await fetch(u, { credentials: "same-origin" }).catch(() => null);
            if (response && response.status === 200 && !response.redirected) await cache.put(u, response);
          }),
        ),
      ),
    );
  }
});

/* ---------------------------------------------------------------- alerts (issue 13) */
// A push carries { title, body, url, tag } (JSON, encrypted by the server for this browser).
// The notification opens the rig's Now screen: an open Tilldawn window is focused and sent
// there, else a new one opens.
type AlertPush = { title?: string; body?: string; url?: string; tag?: string };

self.addEventListener("push", (event) => {
  let payload: AlertPush = {};
  try {
    payload = (event.data?.json() ?? {}) as AlertPush;
  } catch {
    payload = { body: event.data?.text() ?? "" };
  }
  const url = payload.url && new URL(payload.url, self.location.origin).origin === self.location.origin ? payload.url : "/rigs";
  event.waitUntil(
    self.registration.showNotification(payload.title ?? "Tilldawn", {
      body: payload.body ?? "",
      tag: payload.tag,
      icon: "/icons/icon-192.png",
      badge: "/icons/icon-192.png",
      data: { url },
    }),
  );
});

self.addEventListener("notificationclick", (event) => {
  event.notification.close();
  const target = new URL((event.notification.data as { url?: string } | null)?.url ?? "/rigs", self.location.origin).href;
  event.waitUntil(
    (async () => {
      const windows = await self.clients.matchAll({ type: "window", includeUncontrolled: true });
      for (const client of windows) {
        if (new URL(client.url).origin === self.location.origin) {
          await client.focus();
          await client.navigate(target).catch(() => undefined);
          return;
        }
      }
      await self.clients.openWindow(target);
    })(),
  );
});
