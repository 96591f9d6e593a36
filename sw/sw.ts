/// <reference lib="webworker" />
import { cleanupOutdatedCaches, precacheAndRoute } from "workbox-precaching";
import { registerRoute, setCatchHandler } from "workbox-routing";
import { NetworkFirst, NetworkOnly } from "workbox-strategies";

declare const self: ServiceWorkerGlobalScope & { __WB_MANIFEST: Array<{ url: string; revision: string | null }> };

const PAGES = "tilldawn-pages";

// Replaced at build time by the precache list (react-router.config.ts, buildEnd).
precacheAndRoute(self.__WB_MANIFEST);
cleanupOutdatedCaches();

// Server data and sign-in never come from a cache.
registerRoute(({ url }) => url.pathname.startsWith("/api/") || url.pathname.endsWith(".data") || url.pathname.startsWith("/auth/"), new NetworkOnly());

// Pages: the network first, with a short timeout, then the last copy seen.
registerRoute(
  ({ request }) => request.mode === "navigate",
  new NetworkFirst({ cacheName: PAGES, networkTimeoutSeconds: 3 }),
);

setCatchHandler(async ({ request }) => {
  if (request.destination === "document") {
    const cache = await caches.open(PAGES);
    return (await cache.match("/")) ?? Response.error();
  }
  return Response.error();
});

self.addEventListener("install", (event) => {
  // The first visit is not controlled by the worker: keep the start page for offline use.
  event.waitUntil(caches.open(PAGES).then((cache) => cache.add("/").catch(() => undefined)));
});

self.addEventListener("message", (event) => {
  const message = event.data as { type?: string; payload?: { urlsToCache?: string[] } } | undefined;
  if (message?.type === "SKIP_WAITING") void self.skipWaiting();
  if (message?.type === "CACHE_URLS") {
    const urls = message.payload?.urlsToCache ?? [];
    event.waitUntil(caches.open(PAGES).then((cache) => cache.addAll(urls)).catch(() => undefined));
  }
});
